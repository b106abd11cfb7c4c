// The leap's length: the step-size selection of Cao, Gillespie & Petzold (2006).
#include "core/leap_patch.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/leap_channels.hpp"

namespace tessera {

namespace {
constexpr double infinity = std::numeric_limits<double>::infinity();
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
    // The exact part's rate, apart for species that may be fast (leap_fast_species.cpp):
    // those cost O(1) draws per leap when the leap is long enough for them.
    double exact_rate = 0.0;
    fast_candidates_.clear();
    for (const ExactEntry& e : exact_entries_) {
        const int k = e.species;
        const double cells = at_[k];
        if (!(cells > 0)) continue;
        double rate = 0.0;
        channels_of(k, e.small, entry_levels(e), level_at_.data(),
                    [&](double per_cell, bool consumes, int produce, int level, Kind kind) {
                        rate += per_cell * cells;
                        account(per_cell * cells, consumes ? k : -1, produce, level, kind);
                    });
        if (may_be_fast(e)) {
            fast_candidates_.push_back({e.leave_rate, rate});
        } else {
            exact_rate += rate;
        }
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
    // A candidate that the resulting leap is too short for is simulated exactly after all, and
    // its events bound the leap too; tau only shrinks, so this ends within as many rounds as
    // there are candidates.
    const double tau_others = tau;
    for (bool changed = true; changed;) {
        changed = false;
        tau = exact_rate > 0 ? std::min(tau_others, settings_.exact_per_leap / exact_rate) : tau_others;
        for (auto& [leave, rate] : fast_candidates_) {
            if (rate > 0 && leave * tau < settings_.fast_turnover) {
                exact_rate += rate;
                rate = 0.0;
                changed = true;
            }
        }
    }
    return tau;
}

}  // namespace tessera
