// The exact part of a leap: small species and levels with few donors simulated event by
// event across the leap, with the offspring of leaped channels arriving inside it.
#include "core/leap_patch.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/leap_channels.hpp"
#include "core/random_draws.hpp"

namespace tessera {

namespace {
constexpr double infinity = std::numeric_limits<double>::infinity();
}

// A donor trait of transfer level `level` for one whole-copy conjugation of the exact part,
// in proportion to the active cells there now; -1 when there are none.
int LeapPatch::donor_of_level(int level, Rng& rng) const {
    std::int64_t cells = 0;
    for (int xl = 0; xl < nx_; ++xl) cells += trial_[grid_.index(xl, level)];
    if (cells <= 0) return -1;  // the level emptied during the leap: nobody to copy from
    auto u = static_cast<std::int64_t>(rng.below(static_cast<std::uint64_t>(cells)));
    int donor = grid_.index(nx_ - 1, level);
    for (int xl = 0; xl < nx_; ++xl) {
        const int i = grid_.index(xl, level);
        if (u < trial_[i]) {
            donor = i;
            break;
        }
        u -= trial_[i];
    }
    return donor;
}

// A level with few donors follows its cells as they change; the others stay at the
// midpoint, as for the leaped channels.
void LeapPatch::change(int species, std::int64_t by) {
    trial_[species] += by;
    if (species < T_ && crit_level_[grid_.y_level(species)]) {
        live_level_[grid_.y_level(species)] += static_cast<double>(by);
    }
}

// Cells a leaped channel produces: added now to a large species; to a small one at uniform
// times of the leap, so that they divide, convert and die from the moment they appear
// (unless they are more than critical_cells at once).
void LeapPatch::add_cells(int species, std::int64_t n, double tau, Rng& rng) {
    if (is_fast(species)) {
        fast_arrivals_[species] += n;  // drawn in closed form at the end (leap_fast_species.cpp)
        return;
    }
    if (x_[species] >= settings_.critical_cells || exact_entries_.empty()) {
        trial_[species] += n;
        return;
    }
    if (n > settings_.critical_cells) {
        // A flood (a huge resident's mutants, say: up to ~1e11 per leap at K = 1e15) makes
        // the trait large by the end of the leap anyway; it arrives at the end, as in a plain
        // leap, instead of one cell at a time.
        late_.push_back({species, n});
        return;
    }
    for (std::int64_t j = 0; j < n; ++j) arrivals_.push_back({rng.uniform() * tau, species});
}

// The cells an exact entry's rate is proportional to: a small species' count as it changes;
// a large one's count at the midpoint, as for its leaped channels.
double LeapPatch::entry_cells(const ExactEntry& e) const {
    return e.small ? static_cast<double>(trial_[e.species]) : at_[e.species];
}

// The donor levels of an exact entry's conjugations: every level above a small species',
// only the small ones above a large species'.
const std::uint8_t* LeapPatch::entry_levels(const ExactEntry& e) const {
    return e.small ? all_levels_.data() : crit_level_.data();
}

double LeapPatch::exact_rate(const ExactEntry& e) const {
    if (e.fast) return 0.0;  // not simulated event by event in this leap
    if (e.level < 0) return e.own_rate * entry_cells(e);
    const double donors = e.small ? live_above_all_[e.level + 1] : live_above_crit_[e.level + 1];
    return (e.own_rate + conj_factor_ * donors) * entry_cells(e);
}

void LeapPatch::refresh_level_sums() {
    live_above_all_[ny_] = live_above_crit_[ny_] = 0.0;
    for (int l = ny_ - 1; l >= 0; --l) {
        live_above_all_[l] = live_above_all_[l + 1] + live_level_[l];
        live_above_crit_[l] = live_above_crit_[l + 1] + (crit_level_[l] ? live_level_[l] : 0.0);
    }
}

// After species k changed: its own rate, and every rate when a level with few donors moved;
// exact_total_ follows.
void LeapPatch::refresh_after_change(int k) {
    if (k < T_ && crit_level_[grid_.y_level(k)]) {
        refresh_all_rates();
    } else if (entry_of_[k] >= 0) {
        double& rate = entry_rate_[entry_of_[k]];
        const double now = exact_rate(exact_entries_[entry_of_[k]]);
        exact_total_ += now - rate;
        rate = now;
    }
}

void LeapPatch::refresh_all_rates() {
    refresh_level_sums();
    exact_total_ = 0.0;
    for (std::size_t j = 0; j < exact_entries_.size(); ++j) {
        entry_rate_[j] = exact_rate(exact_entries_[j]);
        exact_total_ += entry_rate_[j];
    }
}

// The exact channels over [0, tau): a direct-method simulation (Gillespie 1977) whose rates
// follow the small species and the donor levels with few cells as they change, the patch
// totals held at the leap's midpoint as for the leaped channels, with the arrivals merged in
// time order (the waiting time is redrawn after each, which the exponential's lack of memory
// allows). Each event consumes a cell of a species that has one, so no count goes negative
// here.
std::uint64_t LeapPatch::simulate_exact(double tau, Rng& rng, EventCounts& tally_out) {
    std::sort(arrivals_.begin(), arrivals_.end());
    for (int l = 0; l < ny_; ++l) live_level_[l] = crit_level_[l] ? static_cast<double>(level_cells_[l]) : level_at_[l];
    entry_rate_.resize(exact_entries_.size());
    refresh_all_rates();
    std::size_t next_arrival = 0;
    std::uint64_t events = 0;
    double t = 0.0;
    for (int since_sum = 0;; ++since_sum) {
        // The running total drifts by rounding as rates are swapped in and out: resummed now
        // and then (and never trusted below zero).
        if (since_sum == 64 || exact_total_ < 0) {
            since_sum = 0;
            exact_total_ = 0.0;
            for (double r : entry_rate_) exact_total_ += r;
        }
        const double total = exact_total_;
        const double next_event = total > 0 ? t + rng.exponential() / total : infinity;
        const double arrival = next_arrival < arrivals_.size() ? arrivals_[next_arrival].time : infinity;
        if (arrival < next_event && arrival < tau) {
            const int k = arrivals_[next_arrival++].species;
            change(k, +1);
            refresh_after_change(k);
            t = arrival;
            continue;
        }
        if (next_event >= tau) break;
        t = next_event;
        double u = rng.uniform() * total;
        std::size_t pick = 0;
        for (std::size_t j = 0; j < exact_entries_.size(); ++j) {
            if (entry_rate_[j] > 0) pick = j;  // the last firable one takes rounding residue
            if (u < entry_rate_[j]) break;
            u -= entry_rate_[j];
        }
        const ExactEntry& e = exact_entries_[pick];
        const int k = e.species;
        // Which of its channels: u is now below its rate; walk them in rate per cell.
        double v = std::min(u, entry_rate_[pick]) / entry_cells(e);
        int changed[2] = {-1, -1};
        channels_of(k, e.small, entry_levels(e), live_level_.data(),
                    [&](double per_cell, bool consumes, int produce, int level, Kind kind) {
                        if (changed[0] != -1 || changed[1] != -1 || !(per_cell > 0)) return;
                        if (v >= per_cell) {
                            v -= per_cell;
                            return;
                        }
                        const int donor = produce < 0 && kind == Kind::conjugation ? donor_of_level(level, rng) : -1;
                        if (produce < 0 && kind == Kind::conjugation && donor < 0) {
                            changed[0] = changed[1] = -2;  // nobody to copy from: no event
                            return;
                        }
                        if (consumes) changed[0] = k;
                        changed[1] = produce >= 0 ? produce : donor;
                        tally(kind, 1, tally_out);
                    });
        // Rounding left v past the last channel, or the drawn conjugation has no donor left.
        if (changed[0] < 0 && changed[1] < 0) continue;
        if (changed[0] >= 0) change(changed[0], -1);
        if (changed[1] >= 0 && is_fast(changed[1])) {
            // A cell placed in a fast species at a known time: it stays to the end of the leap
            // with probability e^{-delta (tau - t)} (leap_fast_species.cpp).
            const int f = changed[1];
            const double leave = exact_entries_[entry_of_[f]].leave_rate;
            const double stay = std::exp(-leave * (tau - t));
            ++fast_timed_[f];
            fast_exposure_[f] += 1 - stay;
            if (rng.uniform() < stay) ++fast_timed_alive_[f];
            changed[1] = -1;
        }
        if (changed[1] >= 0) change(changed[1], +1);
        for (int c : changed) {
            if (c >= 0) refresh_after_change(c);
        }
        ++events;
    }
    return events;
}

}  // namespace tessera
