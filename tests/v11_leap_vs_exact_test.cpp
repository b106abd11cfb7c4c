// V11 (validation.md): the leap engine agrees with exact simulation in the first two moments.
//
// Source: Cao, Gillespie & Petzold (2006), "Efficient step size selection for the
// tau-leaping simulation method", J. Chem. Phys. 124:044109, which validates its step-size
// rule exactly this way: means and standard deviations of species counts from leaping
// against those of the SSA (their Figs. 2-6), with eps = 0.03 giving agreement to within
// sampling error at their replicate counts.
//
// Scenario: the default 9-trait grid and default rates (division with costs, death,
// competition into dormancy with q = p x, frequency-dependent conjugation tau = 10 copying
// the whole trait, resuscitation, mutation mu = K^-1/2 ~ 0.022 with the edge rules), one
// patch at K = 2000 started from K cells of trait (0,0). At t = 1 the mutants are tens of
// cells (small traits, exact in the leap engine) and at t = 3 conjugation has moved
// most cells to higher transfer levels. A second scenario uses transfer_only copies, the
// density form and backward mutation.
//
// Tolerance: for every trait and compartment, the difference of the two sample means is
// within z_tol = 5 standard errors (sqrt(se_leap^2 + se_exact^2)), and so is the difference
// of the two sample variances (standard errors from the fourth moments, leap_support.hpp).
// 72 checks per scenario at a two-sided normal tail of 5.7e-7 each: a correct engine fails
// about 1 run in 10^4.5 or less. With N = 1500 replicates, the standard error of a mean
// count is about sd / 27 (~1-3 cells where the sd is ~40); a factor 2 in any single rate
// moves the means of the traits it acts on by far more (tens to hundreds of cells: e.g.
// doubling tau halves the time for the transfer levels to fill, doubling mu doubles the
// mutant counts at t = 1), so such an error fails.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "leap_support.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::leaptest;

namespace {

constexpr double K = 2000;
constexpr std::uint32_t N = 1500;
const std::vector<double> times{1.0, 3.0};

// samples[time][species][replicate]
using Samples = std::vector<std::vector<std::vector<double>>>;

template <class Patch>
Samples simulate(const TraitGrid& g, const RateTable& r, std::uint64_t seed, LeapStats* stats = nullptr) {
    const int S = 2 * g.size();
    Samples out(times.size(), std::vector<std::vector<double>>(S, std::vector<double>(N)));
    std::vector<LeapStats> per_rep(N);
    validation::for_replicates(N, [&](std::uint32_t rep) {
        OnePatch<Patch> run(g, r, K, PatchConditions{}, seed, rep);
        run.active[0] = static_cast<std::int64_t>(K);
        double t = 0;
        for (std::size_t k = 0; k < times.size(); ++k) {
            while (t < times[k] - 1e-9) {
                run.advance(0.5);
                t += 0.5;
            }
            for (int i = 0; i < g.size(); ++i) {
                out[k][i][rep] = static_cast<double>(run.active[i]);
                out[k][g.size() + i][rep] = static_cast<double>(run.dormant[i]);
            }
        }
        if constexpr (std::is_same_v<Patch, LeapPatch>) per_rep[rep] = run.patch.stats();
    });
    if (stats) {
        for (const LeapStats& s : per_rep) {
            stats->leaps += s.leaps;
            stats->rejected += s.rejected;
            stats->critical_events += s.critical_events;
            stats->exact_stretches += s.exact_stretches;
            stats->exact_events += s.exact_events;
        }
    }
    return out;
}

void compare(const Scenario& s, std::uint64_t seed) {
    const TraitGrid g(s.dormancy_axis, s.transfer_axis);
    const RateTable r(g, s.rates, K);
    LeapStats stats;
    const Samples leap = simulate<LeapPatch>(g, r, validation::test_seed(seed), &stats);
    const Samples exact = simulate<ExactPatch>(g, r, validation::test_seed(seed + 1));
    // The leap engine must actually leap here, not hand everything to the exact one.
    INFO("leaps " << stats.leaps << ", exact events inside leaps " << stats.critical_events << ", exact events "
                  << stats.exact_events);
    CHECK(stats.leaps > 100 * N);
    double worst_mean = 0, worst_variance = 0;  // in standard errors, for the log and the docs
    for (std::size_t k = 0; k < times.size(); ++k) {
        for (int sp = 0; sp < 2 * g.size(); ++sp) {
            const Moments a = moments(leap[k][sp]);
            const Moments b = moments(exact[k][sp]);
            const std::string what = std::string(sp < g.size() ? "active" : "dormant") + " trait " +
                                     std::to_string(sp % g.size()) + " at t = " + std::to_string(times[k]);
            INFO(what << ": leap mean " << a.mean << " var " << a.variance << "; exact mean " << b.mean
                      << " var " << b.variance);
            const double se_mean = std::hypot(a.se_mean, b.se_mean);
            const double se_var = std::hypot(a.se_variance, b.se_variance);
            if (se_mean > 0) worst_mean = std::max(worst_mean, std::fabs(a.mean - b.mean) / se_mean);
            if (se_var > 0) worst_variance = std::max(worst_variance, std::fabs(a.variance - b.variance) / se_var);
            if (se_mean > 0) CHECK(std::fabs(a.mean - b.mean) <= validation::z_tolerance * se_mean);
            if (se_var > 0) CHECK(std::fabs(a.variance - b.variance) <= validation::z_tolerance * se_var);
            if (se_mean == 0) CHECK(a.mean == b.mean);
        }
    }
    std::printf("V11: largest difference of means %.2f, of variances %.2f standard errors (limit %g); "
                "leaps %llu, exact events inside leaps %llu\n",
                worst_mean, worst_variance, validation::z_tolerance, static_cast<unsigned long long>(stats.leaps),
                static_cast<unsigned long long>(stats.critical_events));
}

Scenario base() {
    Scenario s;  // the defaults: 9 traits, every local mechanism on
    s.K = K;
    return s;
}

}  // namespace

TEST_CASE("V11 leap and exact agree in mean and variance, default scenario (CGP 2006)", "[validation][V11]") {
    compare(base(), 1101);
}

TEST_CASE("V11 leap and exact agree: transfer_only, density form, backward mutation (CGP 2006)",
          "[validation][V11]") {
    Scenario s = base();
    s.rates.transfer_copies = TransferCopies::transfer_only;
    s.rates.transfer_form = TransferForm::density;
    s.rates.transfer = 3.0;  // per K_p: of the same order as the frequency form at Na ~ 3K
    s.rates.mutation_backward = 0.3;
    s.rates.dormant_death = 0.5;
    compare(s, 1111);
}
