// The leap engine's driver: setting up the mutation streams, the loop of leaps and exact
// stretches over a sync step, and one leap of the leaped channels with its exact part.
#include "core/leap_patch.hpp"

#include <algorithm>
#include <cmath>

#include "core/leap_channels.hpp"
#include "core/random_draws.hpp"

namespace tessera {

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
      at_(2 * T_),
      level_at_(ny_),
      level_cells_(ny_),
      level_gains_(ny_),
      level_rate_(ny_),
      competition_(T_),
      all_levels_(ny_, 1),
      crit_level_(ny_),
      entry_of_(2 * T_, -1),
      live_level_(ny_),
      live_above_all_(ny_ + 1),
      live_above_crit_(ny_ + 1),
      level_bounded_(ny_),
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

bool LeapPatch::try_leap(double tau, Rng& rng, EventCounts& tally_out, std::uint64_t& exact_events) {
    choose_fast(tau);
    trial_ = x_;
    arrivals_.clear();
    late_.clear();
    std::fill(level_gains_.begin(), level_gains_.end(), 0);
    EventCounts t;
    for (const Channel& c : channels_) {
        const std::int64_t k = poisson(rng, c.rate * tau);
        if (k == 0) continue;
        if (c.consume >= 0) trial_[c.consume] -= k;
        if (c.produce >= 0) {
            add_cells(c.produce, k, tau, rng);
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
            add_cells(i, n, tau, rng);
            gains -= n;
            cells -= x_[i];
        }
    }
    for (std::int64_t v : trial_) {
        if (v < 0) return false;  // before the exact part, whose rates need counts >= 0
    }
    const std::uint64_t exact = exact_entries_.empty() ? 0 : simulate_exact(tau, rng, t);
    if (!fast_.empty()) resolve_fast(tau, rng, t);
    for (const auto& [species, n] : late_) trial_[species] += n;
    for (std::int64_t v : trial_) {
        if (v < 0) return false;
    }
    tally_out = t;
    exact_events = exact;
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
        std::copy(x_.begin(), x_.end(), at_.begin());
        build_channels();
        if (!(a0_ > 0)) break;
        const double remaining = duration - t;
        double tau1 = channels_.empty() ? 0.0 : step_size();
        const double too_short = settings_.exact_below / a0_;
        bool leapt = false;
        while (!channels_.empty() && tau1 >= too_short) {
            const double tau = std::min(tau1, remaining);
            set_midpoint(tau);
            EventCounts step_counts;
            std::uint64_t critical = 0;
            if (try_leap(tau, rng, step_counts, critical)) {
                x_.swap(trial_);
                counts += step_counts;
                events += step_counts.events();
                ++stats_.leaps;
                stats_.critical_events += critical;
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
