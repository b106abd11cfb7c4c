#include "core/leap_patch.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/random_draws.hpp"

namespace tessera {

namespace {
constexpr double infinity = std::numeric_limits<double>::infinity();
}

LeapPatch::LeapPatch(const TraitGrid& grid, const RateTable& rates, double K, LeapSettings settings)
    : grid_(grid),
      rates_(rates),
      K_(K),
      settings_(settings),
      T_(grid.size()),
      nx_(grid.x_levels()),
      ny_(grid.y_levels()),
      exact_(grid, rates, K),
      mutants_(T_),
      self_share_(T_, 1.0),
      x_(2 * T_),
      trial_(2 * T_),
      level_cells_(ny_),
      level_gains_(ny_),
      level_rate_(ny_),
      drift_(2 * T_),
      variance_(2 * T_),
      reactant_(2 * T_),
      eps_over_g_(2 * T_) {
    // Births of trait i split into independent Poisson streams, one per offspring trait, with
    // the probabilities of model.md section 2 (thinning keeps them exact).
    const double mu = rates.mutation_probability;
    const double back = rates.mutation_backward;
    for (int i = 0; i < T_; ++i) {
        const MutationTargets* dirs[2] = {&rates.forward[i], &rates.backward[i]};
        const double share[2] = {mu * (1 - back), mu * back};
        for (int d = 0; d < 2; ++d) {
            const MutationTargets& t = *dirs[d];
            if (t.count == 0 || !(share[d] > 0)) continue;  // no target: no mutation happens
            for (int k = 0; k < t.count; ++k) {
                mutants_[i].push_back({t.trait[k], share[d] / t.count});
                self_share_[i] -= share[d] / t.count;
            }
        }
    }
    // The highest order in which a count enters a propensity (g_i of CGP 2006, eq. 27):
    // competition is second order in the active counts; frequency-dependent conjugation,
    // tau A_j L_l / Na, moves with three of them.
    const bool conjugation = rates.transfer > 0 && ny_ > 1;
    g_active_ = conjugation && rates.transfer_form == TransferForm::frequency ? 3.0 : 2.0;
    g_dormant_ = rates.competition_counts_dormant ? 2.0 : 1.0;
    for (int k = 0; k < 2 * T_; ++k) eps_over_g_[k] = settings_.epsilon / (k < T_ ? g_active_ : g_dormant_);
}

double LeapPatch::total_rate(const std::int64_t* active, const std::int64_t* dormant,
                             const PatchConditions& where) const {
    const double Kp = K_ * where.capacity;
    const double inv_Kp = Kp > 0 ? 1.0 / Kp : 0.0;
    double na = 0, nd = 0, per_cell = 0, pairs = 0;
    std::int64_t below = 0;
    // Cells per transfer level, accumulated level by level: pairs = sum_{l<l'} L_l L_l'.
    for (int l = 0; l < ny_; ++l) {
        std::int64_t level = 0;
        for (int xl = 0; xl < nx_; ++xl) level += active[grid_.index(xl, l)];
        pairs += static_cast<double>(below) * static_cast<double>(level);
        below += level;
    }
    double competition = 0;
    for (int i = 0; i < T_; ++i) {
        const double a = static_cast<double>(active[i]);
        na += a;
        nd += static_cast<double>(dormant[i]);
        per_cell += (rates_.birth[i] + rates_.death[i] + where.stress) * a;
        competition += rates_.competition[i] * a;
    }
    const double ncomp = rates_.competition_counts_dormant ? na + nd : na;
    double conj = 0;
    if (na > 0 && pairs > 0) {
        conj = rates_.transfer * pairs * (rates_.transfer_form == TransferForm::frequency ? 1.0 / na : inv_Kp);
    }
    return per_cell + competition * ncomp * inv_Kp + conj +
           (rates_.dormant_death + rates_.resuscitation * where.resuscitation) * nd;
}

void LeapPatch::build_channels() {
    channels_.clear();
    std::int64_t na = 0, nd = 0;
    std::fill(level_cells_.begin(), level_cells_.end(), 0);
    for (int i = 0; i < T_; ++i) {
        na += x_[i];
        nd += x_[T_ + i];
        level_cells_[grid_.y_level(i)] += x_[i];
    }
    const double ncomp = static_cast<double>(rates_.competition_counts_dormant ? na + nd : na);
    const double conj_factor =
        na == 0 ? 0.0
                : (rates_.transfer_form == TransferForm::frequency ? rates_.transfer / static_cast<double>(na)
                                                                   : rates_.transfer * inv_Kp_);
    a0_ = critical_rate_ = 0.0;
    any_noncritical_ = false;
    auto add = [&](double rate, int reactant, int consume, int produce, int level, Kind kind) {
        if (!(rate > 0)) return;  // a channel that cannot fire costs no draw
        const bool critical = x_[reactant] < settings_.critical_cells;
        channels_.push_back({rate, reactant, consume, produce, level, kind, critical});
        a0_ += rate;
        if (critical) {
            critical_rate_ += rate;
        } else {
            any_noncritical_ = true;
        }
    };
    for (int i = 0; i < T_; ++i) {
        if (x_[i] == 0) continue;
        const double a = static_cast<double>(x_[i]);
        const double birth = rates_.birth[i] * a;
        add(birth * self_share_[i], i, -1, i, 0, Kind::birth);
        for (const Mutant& m : mutants_[i]) add(birth * m.probability, i, -1, m.trait, 0, Kind::mutant_birth);
        add((rates_.death[i] + stress_) * a, i, i, -1, 0, Kind::death);
        const double competition = rates_.competition[i] * ncomp * inv_Kp_ * a;
        const double q = rates_.dormancy_probability[i];
        add(competition * (1 - q), i, i, -1, 0, Kind::competition_death);
        add(competition * q, i, i, T_ + i, 0, Kind::dormancy);
        const int y = grid_.y_level(i);
        for (int l = y + 1; l < ny_; ++l) {
            if (level_cells_[l] == 0) continue;
            const int produce =
                rates_.transfer_copies == TransferCopies::whole ? -1 : grid_.index(grid_.x_level(i), l);
            add(conj_factor * a * static_cast<double>(level_cells_[l]), i, i, produce, l, Kind::conjugation);
        }
    }
    for (int i = 0; i < T_; ++i) {
        if (x_[T_ + i] == 0) continue;
        const double z = static_cast<double>(x_[T_ + i]);
        add(rates_.dormant_death * z, T_ + i, T_ + i, -1, 0, Kind::dormant_death);
        add(resus_ * z, T_ + i, T_ + i, i, 0, Kind::resuscitation);
    }
}

// CGP 2006, eqs. (32)-(33): with mu_k and sigma_k^2 the mean and variance of the change of
// species k per unit time from the non-critical channels, the step keeps every reactant
// species' expected change and standard deviation within max(eps x_k / g_k, 1). The bound
// depends only on the species, so it is taken once per reactant species (18 with 9 traits),
// not once per channel (~60): the same tau for a third of the divisions.
double LeapPatch::step_size() {
    const std::size_t S = x_.size();
    std::fill_n(drift_.begin(), S, 0.0);
    std::fill_n(variance_.begin(), S, 0.0);
    std::fill_n(reactant_.begin(), S, std::uint8_t{0});
    std::fill(level_rate_.begin(), level_rate_.end(), 0.0);
    bool whole = false;
    for (const Channel& c : channels_) {
        if (c.critical) continue;
        reactant_[c.reactant] = 1;
        if (c.consume >= 0) {
            drift_[c.consume] -= c.rate;
            variance_[c.consume] += c.rate;
        }
        if (c.produce >= 0) {
            drift_[c.produce] += c.rate;
            variance_[c.produce] += c.rate;
        } else if (c.kind == Kind::conjugation) {
            level_rate_[c.level] += c.rate;
            whole = true;
        }
    }
    // Whole-copy conjugations won by level l go to its traits in proportion to their cells.
    for (int l = 0; whole && l < ny_; ++l) {
        if (!(level_rate_[l] > 0)) continue;
        const double per_cell = level_rate_[l] / static_cast<double>(level_cells_[l]);
        for (int xl = 0; xl < nx_; ++xl) {
            const int i = grid_.index(xl, l);
            drift_[i] += per_cell * static_cast<double>(x_[i]);
            variance_[i] += per_cell * static_cast<double>(x_[i]);
        }
    }
    double tau = infinity;
    for (std::size_t k = 0; k < S; ++k) {
        if (!reactant_[k]) continue;
        const double bound = std::max(eps_over_g_[k] * static_cast<double>(x_[k]), 1.0);
        if (drift_[k] != 0) tau = std::min(tau, bound / std::fabs(drift_[k]));
        if (variance_[k] > 0) tau = std::min(tau, bound * bound / variance_[k]);
    }
    return tau;
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

bool LeapPatch::try_leap(double tau, int fire, Rng& rng, EventCounts& tally_out) {
    trial_ = x_;
    std::fill(level_gains_.begin(), level_gains_.end(), 0);
    EventCounts t;
    for (std::size_t idx = 0; idx < channels_.size(); ++idx) {
        const Channel& c = channels_[idx];
        const std::int64_t k = c.critical ? (static_cast<int>(idx) == fire ? 1 : 0) : poisson(rng, c.rate * tau);
        if (k == 0) continue;
        if (c.consume >= 0) trial_[c.consume] -= k;
        if (c.produce >= 0) {
            trial_[c.produce] += k;
        } else if (c.kind == Kind::conjugation) {
            level_gains_[c.level] += k;
        }
        tally(c.kind, k, t);
    }
    // Donor traits of whole-copy conjugations: a multinomial over the level's column in
    // proportion to the active cells at the start of the leap (sequential binomials).
    for (int l = 0; l < ny_; ++l) {
        std::int64_t gains = level_gains_[l];
        std::int64_t cells = level_cells_[l];
        for (int xl = 0; xl < nx_ && gains > 0; ++xl) {
            const int i = grid_.index(xl, l);
            if (x_[i] == 0) continue;
            const std::int64_t n =
                x_[i] == cells ? gains
                               : binomial(rng, gains, static_cast<double>(x_[i]) / static_cast<double>(cells));
            trial_[i] += n;
            gains -= n;
            cells -= x_[i];
        }
    }
    for (std::int64_t v : trial_) {
        if (v < 0) return false;
    }
    tally_out = t;
    return true;
}

std::uint64_t LeapPatch::advance(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where,
                                 double duration, Rng& rng, EventCounts& counts) {
    const double Kp = K_ * where.capacity;
    inv_Kp_ = Kp > 0 ? 1.0 / Kp : 0.0;
    stress_ = where.stress;
    resus_ = rates_.resuscitation * where.resuscitation;
    std::copy(active, active + T_, x_.begin());
    std::copy(dormant, dormant + T_, x_.begin() + T_);
    std::uint64_t events = 0;
    double t = 0.0;
    while (t < duration) {
        build_channels();
        if (!(a0_ > 0)) break;
        const double remaining = duration - t;
        double tau1 = any_noncritical_ ? step_size() : infinity;
        const double too_short = settings_.exact_below / a0_;
        bool leapt = false;
        while (any_noncritical_ && tau1 >= too_short) {
            // CGP 2005, steps 4-5: the next critical event against the leap of the rest.
            const double tau2 = critical_rate_ > 0 ? rng.exponential() / critical_rate_ : infinity;
            double tau = tau1;
            int fire = -1;
            if (tau2 <= tau1) {
                tau = tau2;
                double u = rng.uniform() * critical_rate_;
                for (std::size_t idx = 0; idx < channels_.size(); ++idx) {
                    if (!channels_[idx].critical) continue;
                    fire = static_cast<int>(idx);  // the last critical one takes rounding residue
                    if (u < channels_[idx].rate) break;
                    u -= channels_[idx].rate;
                }
            }
            if (tau >= remaining) {
                tau = remaining;  // no critical event falls inside the step
                fire = -1;
            }
            EventCounts step_counts;
            if (try_leap(tau, fire, rng, step_counts)) {
                x_.swap(trial_);
                counts += step_counts;
                events += step_counts.events();
                ++stats_.leaps;
                if (fire >= 0) ++stats_.critical_firings;
                t = tau >= remaining ? duration : t + tau;
                leapt = true;
                break;
            }
            ++stats_.rejected;  // a count would go negative: half the step (CGP 2005, step 6)
            tau1 = tau / 2;
        }
        if (leapt) continue;
        // Too short a leap, or nothing to leap: a stretch of exact events (CGP 2006, sec. IV).
        const double span = std::min(remaining, settings_.exact_events / a0_);
        std::copy(x_.begin(), x_.begin() + T_, active);
        std::copy(x_.begin() + T_, x_.end(), dormant);
        const std::uint64_t n = exact_.advance(active, dormant, where, span, rng, counts);
        std::copy(active, active + T_, x_.begin());
        std::copy(dormant, dormant + T_, x_.begin() + T_);
        events += n;
        ++stats_.exact_stretches;
        stats_.exact_events += n;
        t = span >= remaining ? duration : t + span;
    }
    std::copy(x_.begin(), x_.begin() + T_, active);
    std::copy(x_.begin() + T_, x_.end(), dormant);
    return events;
}

}  // namespace tessera
