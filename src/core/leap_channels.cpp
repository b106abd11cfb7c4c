// Which channels a leap has and their rates: the patch totals rates depend on, the split into
// leaped channels and exact entries, the estimated-midpoint rates, and the books.
#include "core/leap_patch.hpp"

#include <algorithm>

#include "core/leap_channels.hpp"

namespace tessera {

// The totals of at_ every rate depends on: L_l, the competing cells, the conjugation factor.
void LeapPatch::take_totals() {
    double na = 0, nd = 0;
    std::fill(level_at_.begin(), level_at_.end(), 0.0);
    for (int i = 0; i < T_; ++i) {
        na += at_[i];
        nd += at_[T_ + i];
        level_at_[grid_.y_level(i)] += at_[i];
    }
    const double ncomp = rates_.competition_counts_dormant ? na + nd : na;
    conj_factor_ = !(na > 0) || !(rates_.transfer > 0)
                       ? 0.0
                       : (rates_.transfer_form == TransferForm::frequency ? rates_.transfer / na
                                                                          : rates_.transfer * inv_Kp_);
    for (int i = 0; i < T_; ++i) competition_[i] = rates_.competition[i] * ncomp * inv_Kp_;
}

void LeapPatch::build_channels() {
    channels_.clear();
    exact_entries_.clear();
    std::fill(level_cells_.begin(), level_cells_.end(), 0);
    for (int i = 0; i < T_; ++i) level_cells_[grid_.y_level(i)] += x_[i];
    // Level 0 is nobody's donor level, so it is never a small one.
    for (int l = 0; l < ny_; ++l) crit_level_[l] = l > 0 && level_cells_[l] < settings_.critical_cells;
    take_totals();
    a0_ = 0.0;
    for (int k = 0; k < 2 * T_; ++k) {
        const double cells = at_[k];
        const int level = k < T_ ? grid_.y_level(k) : -1;
        if (x_[k] < settings_.critical_cells) {
            // Small: every channel exact, even while empty (offspring may arrive).
            const double own = own_rate(k);
            double donors = 0.0;
            for (int l = level + 1; level >= 0 && l < ny_; ++l) donors += level_at_[l];
            a0_ += (own + conj_factor_ * donors) * cells;
            entry_of_[k] = static_cast<std::int32_t>(exact_entries_.size());
            exact_entries_.push_back({k, level, true, own, leave_rate(k)});
            continue;
        }
        // Large: leaped, except its conjugations into levels with few donors.
        bool exact_conjugation = false;
        channels_of(k, true, all_levels_.data(), level_at_.data(),
                    [&](double per_cell, bool consumes, int produce, int lvl, Kind kind) {
                        const double rate = per_cell * cells;
                        a0_ += rate;
                        if (lvl >= 0 && crit_level_[lvl]) {
                            exact_conjugation = true;
                            return;
                        }
                        if (!(rate > 0)) return;  // a channel that cannot fire costs no draw
                        channels_.push_back({rate, per_cell, k, consumes ? k : -1, produce, lvl, kind});
                    });
        entry_of_[k] = -1;
        if (exact_conjugation) {
            entry_of_[k] = static_cast<std::int32_t>(exact_entries_.size());
            exact_entries_.push_back({k, level, false, 0.0});
        }
    }
}

// The sum of the rates per cell of a species' own channels (not its conjugations): births
// with and without mutation add up to the birth rate, competition deaths and dormancy to
// the competition rate.
double LeapPatch::own_rate(int k) const {
    return k < T_ ? rates_.birth[k] + rates_.death[k] + stress_ + competition_[k]
                  : rates_.dormant_death + resus_;
}

void LeapPatch::tally(Kind kind, std::int64_t k, EventCounts& c) const {
    const auto n = static_cast<std::uint64_t>(k);
    switch (kind) {
        case Kind::birth: c.births += n; break;
        case Kind::mutant_birth: c.births += n; c.mutations += n; break;
        case Kind::death: c.deaths += n; break;
        case Kind::competition_death: c.competition_deaths += n; break;
        case Kind::dormancy: c.dormancies += n; break;
        case Kind::dormant_death: c.dormant_deaths += n; break;
        case Kind::resuscitation: c.resuscitations += n; break;
        case Kind::conjugation: c.conjugations += n; break;
    }
}

// Gillespie (2001), "Approximate accelerated stochastic simulation of chemically reacting
// systems", J. Chem. Phys. 115:1716, the estimated-midpoint technique: every rate is taken
// at the state the drift reaches after half the leap. Its error in the mean is O(tau^2)
// instead of the explicit leap's O(tau) in the large-population scaling (Anderson, Ganguly
// & Kurtz 2011, "Error analysis of tau-leap simulation methods", Ann. Appl. Probab.
// 21:2226), for the price of one more evaluation of the rates and no extra draws.
// Only the rates change there (which channels exist and which are exact stays as at the
// start): each leaped channel's rate per cell is constant (kept from the start), a share of
// its trait's competition rate, or the conjugation factor times its donor level, taken
// afresh from the midpoint's totals (also when a rejected leap is retried shorter).
void LeapPatch::set_midpoint(double tau) {
    for (std::size_t k = 0; k < x_.size(); ++k) {
        at_[k] = std::max(0.0, static_cast<double>(x_[k]) + 0.5 * tau * drift_[k]);
    }
    take_totals();
    for (Channel& c : channels_) {
        const int i = c.reactant;
        double per_cell = c.per_cell;
        switch (c.kind) {
            case Kind::competition_death: per_cell = competition_[i] * (1 - rates_.dormancy_probability[i]); break;
            case Kind::dormancy: per_cell = competition_[i] * rates_.dormancy_probability[i]; break;
            case Kind::conjugation: per_cell = conj_factor_ * level_at_[c.level]; break;
            default: break;  // births, deaths, resuscitation: constant per cell
        }
        c.rate = per_cell * at_[i];
    }
    for (ExactEntry& e : exact_entries_) {
        if (e.small) {
            e.own_rate = own_rate(e.species);
            e.leave_rate = leave_rate(e.species);
        }
    }
}

}  // namespace tessera
