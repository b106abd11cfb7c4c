// Fast small species of a leap: a trait of few cells whose cells leave almost as soon as they
// arrive (for example back-mutants converted at once by a huge donor population under
// density-dependent transfer, docs/reliability.md) would cost one exact event per arrival
// and per departure, billions per unit time. Over a leap in which every cell's expected stay
// 1/delta is far shorter than the leap (delta tau >= fast_turnover), its state is instead
// drawn from the law of the immigration-death process (the M/M/infinity queue; Karlin &
// Taylor 1975, A First Course in Stochastic Processes, ch. 4; Kleinrock 1975, Queueing
// Systems I, sec. 3.8): independently of each other,
//   - each of the n0 cells present at the start is still there at tau with probability
//     e^{-delta tau};
//   - each of the N cells placed at a uniform time of the leap (by the leaped channels) is
//     there with probability (1 - e^{-delta tau}) / (delta tau);
//   - each cell placed at a known time t (by the exact part) with probability e^{-delta (tau - t)};
// and every cell that left took channel c with probability rate_c / delta (competing
// exponential clocks). Births of these cells are rare (birth <= fast_birth_ratio x delta):
// their number is Poisson over the expected cell time, the offspring of the trait itself
// join the uniform arrivals, mutants go to their targets. That last step is the only
// approximation beyond the leap's own, of relative size birth / delta.
#include <cmath>

#include "core/leap_channels.hpp"
#include "core/random_draws.hpp"

namespace tessera {

// Per cell, the rates of every channel that consumes a cell of `species` at the state at_.
double LeapPatch::leave_rate(int k) const {
    if (k >= T_) return rates_.dormant_death + resus_;
    double donors = 0.0;
    for (int l = grid_.y_level(k) + 1; l < ny_; ++l) donors += level_at_[l];
    return rates_.death[k] + stress_ + competition_[k] + conj_factor_ * donors;
}

bool LeapPatch::may_be_fast(const ExactEntry& e) const {
    if (!e.small || !(e.leave_rate > 0)) return false;
    const double birth = e.species < T_ ? rates_.birth[e.species] : 0.0;
    return birth <= settings_.fast_birth_ratio * e.leave_rate;
}

void LeapPatch::choose_fast(double tau) {
    bool any = false;
    for (ExactEntry& e : exact_entries_) {
        e.fast = may_be_fast(e) && e.leave_rate * tau >= settings_.fast_turnover;
        any = any || e.fast;
    }
    if (!any) {
        fast_.clear();
        return;
    }
    fast_.assign(x_.size(), 0);
    fast_arrivals_.assign(x_.size(), 0);
    fast_exposure_.assign(x_.size(), 0.0);
    fast_timed_.assign(x_.size(), 0);
    fast_timed_alive_.assign(x_.size(), 0);
    for (const ExactEntry& e : exact_entries_) {
        if (e.fast) fast_[e.species] = pending_fast;
    }
}

// n cells made by a channel of kind `kind` with product `produce` (-1 and a level: a
// whole-copy conjugation, whose donor traits are drawn over the level's column in proportion
// to its cells now, by sequential binomials as in try_leap). Returns how many could not be
// placed: whole copies from a level that has no cells left (no donor, no event).
std::int64_t LeapPatch::add_products(int produce, int level, Kind kind, std::int64_t n, Rng& rng) {
    if (n <= 0) return 0;
    if (produce >= 0) {
        // Into a fast species still to be drawn: one of its arrivals. Into one drawn already
        // (a mutant of a later fast species, say): it is there at the end of the leap.
        if (is_fast(produce) && fast_[produce] == pending_fast) {
            fast_arrivals_[produce] += n;
        } else {
            trial_[produce] += n;
        }
        return 0;
    }
    if (kind != Kind::conjugation) return 0;
    std::int64_t cells = 0;
    for (int xl = 0; xl < nx_; ++xl) cells += std::max<std::int64_t>(trial_[grid_.index(xl, level)], 0);
    for (int xl = 0; xl < nx_ && n > 0 && cells > 0; ++xl) {
        const int i = grid_.index(xl, level);
        const std::int64_t here = std::max<std::int64_t>(trial_[i], 0);
        if (here == 0) continue;
        const std::int64_t m =
            here == cells ? n : binomial(rng, n, static_cast<double>(here) / static_cast<double>(cells));
        trial_[i] += m;
        n -= m;
        cells -= here;
    }
    return n;
}

void LeapPatch::resolve_fast(double tau, Rng& rng, EventCounts& tally_out) {
    for (const ExactEntry& e : exact_entries_) {
        if (!e.fast) continue;
        const int k = e.species;
        const double delta = e.leave_rate;
        const double stay_start = std::exp(-delta * tau);
        const double stay_uniform = -std::expm1(-delta * tau) / (delta * tau);
        const std::int64_t n0 = trial_[k];
        // Births over the expected cell time; the trait's own offspring join the arrivals.
        if (k < T_ && rates_.birth[k] > 0) {
            const double cell_time = (static_cast<double>(n0) * (1 - stay_start) +
                                      static_cast<double>(fast_arrivals_[k]) * (1 - stay_uniform) + fast_exposure_[k]) /
                                     delta;
            std::int64_t births = poisson(rng, rates_.birth[k] * cell_time);
            double mass = 1.0;  // of the offspring traits not split off yet
            for (const Mutant& m : mutants_[k]) {
                const std::int64_t to = births > 0 ? binomial(rng, births, m.probability / mass) : 0;
                mass -= m.probability;
                births -= to;
                tally(Kind::mutant_birth, to, tally_out);
                add_products(m.trait, -1, Kind::mutant_birth, to, rng);  // a trait: always placed
            }
            tally(Kind::birth, births, tally_out);
            fast_arrivals_[k] += births;
        }
        const std::int64_t arrivals = fast_arrivals_[k];
        const std::int64_t stayed = binomial(rng, n0, stay_start) + binomial(rng, arrivals, stay_uniform) +
                                    fast_timed_alive_[k];
        std::int64_t left = n0 + arrivals + fast_timed_[k] - stayed;
        trial_[k] = stayed;
        fast_[k] = drawn_fast;
        ++stats_.fast_resolutions;
        // The leavers over the consuming channels, in proportion to their rates per cell;
        // the last channel takes what is left, so rounding in the rates loses no cell.
        leavers_.clear();
        channels_of(k, true, all_levels_.data(), level_at_.data(),
                    [&](double per_cell, bool consumes, int produce, int level, Kind kind) {
                        if (consumes && per_cell > 0) leavers_.push_back({per_cell, produce, level, kind});
                    });
        double rest = 0.0;
        for (const Leaver& c : leavers_) rest += c.per_cell;
        for (std::size_t j = 0; j < leavers_.size() && left > 0; ++j) {
            const Leaver& c = leavers_[j];
            const std::int64_t n =
                j + 1 == leavers_.size() ? left : binomial(rng, left, std::min(1.0, c.per_cell / rest));
            rest -= c.per_cell;
            left -= n;
            const std::int64_t unplaced = add_products(c.produce, c.level, c.kind, n, rng);
            trial_[k] += unplaced;  // no donor left to copy: those cells stay as they were
            tally(c.kind, n - unplaced, tally_out);
        }
    }
}

}  // namespace tessera
