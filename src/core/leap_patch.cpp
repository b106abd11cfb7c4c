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

template <class F>
void LeapPatch::channels_of(int k, bool own, const std::uint8_t* level_mask, const double* L, F&& f) const {
    if (k >= T_) {
        if (own) {
            f(rates_.dormant_death, true, -1, -1, Kind::dormant_death);
            f(resus_, true, k - T_, -1, Kind::resuscitation);
        }
        return;
    }
    const int i = k;
    if (own) {
        const double birth = rates_.birth[i];
        f(birth * self_share_[i], false, i, -1, Kind::birth);
        for (const Mutant& m : mutants_[i]) f(birth * m.probability, false, m.trait, -1, Kind::mutant_birth);
        f(rates_.death[i] + stress_, true, -1, -1, Kind::death);
        const double q = rates_.dormancy_probability[i];
        f(competition_[i] * (1 - q), true, -1, -1, Kind::competition_death);
        f(competition_[i] * q, true, T_ + i, -1, Kind::dormancy);
    }
    const bool whole = rates_.transfer_copies == TransferCopies::whole;
    for (int l = grid_.y_level(i) + 1; l < ny_; ++l) {
        if (!level_mask[l]) continue;
        f(conj_factor_ * L[l], true, whole ? -1 : grid_.index(grid_.x_level(i), l), l, Kind::conjugation);
    }
}

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
            exact_entries_.push_back({k, level, true, own});
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

// CGP 2006, eqs. (32)-(33): with mu_k and sigma_k^2 the mean and variance of the change of
// species k per unit time, the step keeps the expected change and standard deviation of
// every count a leaped rate is proportional to within max(eps x_k / g_k, 1): each leaped
// channel's own cells, and the totals its rate also depends on (the donor level L_l of a
// conjugation, the patch's active total through competition and frequency-dependent
// transfer). Small species are simulated exactly, so they bound the step only through those
// totals. mu and sigma^2 count every channel, leaped or exact. The bound is taken once per
// species (18 with 9 traits), not once per channel (~60).
double LeapPatch::step_size() {
    const std::size_t S = x_.size();
    std::fill_n(drift_.begin(), S, 0.0);
    std::fill_n(variance_.begin(), S, 0.0);
    std::fill_n(reactant_.begin(), S, std::uint8_t{0});
    std::fill(level_rate_.begin(), level_rate_.end(), 0.0);
    std::fill(level_bounded_.begin(), level_bounded_.end(), std::uint8_t{0});
    auto account = [&](double rate, int consume, int produce, int level, Kind kind) {
        if (consume >= 0) {
            drift_[consume] -= rate;
            variance_[consume] += rate;
        }
        if (produce >= 0) {
            drift_[produce] += rate;
            variance_[produce] += rate;
        } else if (kind == Kind::conjugation) {
            level_rate_[level] += rate;
        }
    };
    for (const Channel& c : channels_) {
        reactant_[c.reactant] = 1;
        if (c.kind == Kind::conjugation) level_bounded_[c.level] = 1;
        account(c.rate, c.consume, c.produce, c.level, c.kind);
    }
    double exact_rate = 0.0;
    for (const ExactEntry& e : exact_entries_) {
        const int k = e.species;
        const double cells = at_[k];
        if (!(cells > 0)) continue;
        channels_of(k, e.small, entry_levels(e), level_at_.data(),
                    [&](double per_cell, bool consumes, int produce, int level, Kind kind) {
                        exact_rate += per_cell * cells;
                        account(per_cell * cells, consumes ? k : -1, produce, level, kind);
                    });
    }
    // Whole-copy conjugations won by level l go to its traits in proportion to their cells.
    for (int l = 0; l < ny_; ++l) {
        if (!(level_rate_[l] > 0)) continue;
        const double per_cell = level_rate_[l] / static_cast<double>(level_cells_[l]);
        for (int xl = 0; xl < nx_; ++xl) {
            const int i = grid_.index(xl, l);
            drift_[i] += per_cell * static_cast<double>(x_[i]);
            variance_[i] += per_cell * static_cast<double>(x_[i]);
        }
    }
    double tau = infinity;
    auto bound_by = [&](double x, double eps_over_g, double mu, double sigma2) {
        const double bound = std::max(eps_over_g * x, 1.0);
        if (mu != 0) tau = std::min(tau, bound / std::fabs(mu));
        if (sigma2 > 0) tau = std::min(tau, bound * bound / sigma2);
    };
    for (std::size_t k = 0; k < S; ++k) {
        if (reactant_[k]) bound_by(static_cast<double>(x_[k]), eps_over_g_[k], drift_[k], variance_[k]);
    }
    // The totals: the active cells of each donor level driving a leaped conjugation, and all
    // active cells (and dormant ones when they compete). Variances add as if independent.
    double na = 0, mu_a = 0, var_a = 0, nd = 0, mu_d = 0, var_d = 0;
    for (int l = 0; l < ny_; ++l) {
        double L = 0, mu = 0, var = 0;
        for (int xl = 0; xl < nx_; ++xl) {
            const int i = grid_.index(xl, l);
            L += static_cast<double>(x_[i]);
            mu += drift_[i];
            var += variance_[i];
        }
        if (level_bounded_[l]) bound_by(L, eps_over_g_[0], mu, var);
        na += L;
        mu_a += mu;
        var_a += var;
    }
    if (rates_.competition_counts_dormant) {
        for (int i = 0; i < T_; ++i) {
            nd += static_cast<double>(x_[T_ + i]);
            mu_d += drift_[T_ + i];
            var_d += variance_[T_ + i];
        }
    }
    bound_by(na + nd, eps_over_g_[0], mu_a + mu_d, var_a + var_d);
    // The exact part's work per leap stays bounded (a recipient of 1e15 cells facing a few
    // donors at density-dependent rates would otherwise make ~1e9 exact events in a leap).
    if (exact_rate > 0) tau = std::min(tau, settings_.exact_per_leap / exact_rate);
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
        if (e.small) e.own_rate = own_rate(e.species);
    }
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
        if (changed[1] >= 0) change(changed[1], +1);
        for (int c : changed) {
            if (c >= 0) refresh_after_change(c);
        }
        ++events;
    }
    return events;
}

bool LeapPatch::try_leap(double tau, Rng& rng, EventCounts& tally_out, std::uint64_t& exact_events) {
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
