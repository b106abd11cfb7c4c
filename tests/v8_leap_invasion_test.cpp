// V8 (validation.md) with the leap engine at large K: one mutant cell invading a resident at
// equilibrium survives with probability 1 - (d + C n*) / b_m.
//
// Source: supercritical linear branching process survival, K. B. Athreya & P. E. Ney
// (1972), Branching Processes, ch. III (a birth-death process with per-cell rates b > d from
// one cell survives with probability 1 - d/b). The mutant's death rate is d plus competition
// C n* from the resident at its equilibrium density n* = (b_r - d) / C.
//
// What this shows: at K = 1e5 the resident (3e5 cells) is leapt, while the mutant, from one
// cell, sits below the critical threshold n_c = 10 and is simulated event by event (CGP
// 2005): its early life, which decides survival, is exact. A leap engine that Poisson-leapt
// the mutant would still be close, but one that mishandled the rare trait (e.g. let it go
// negative, or skipped its events) would not.
//
// System: resident b_r = 4, d = 1, C = 1: n* = 3, so the mutant's death rate is 4; mutant
// b_m = 6: survival 1 - 4/6 = 1/3. Survival is scored as reaching 100 cells (after which
// extinction has probability (4/6)^100 ~ 2.5e-18).
// Tolerance: N = 2500 replicates, z_tolerance = 5 standard errors of a proportion,
// 5 sqrt(p (1 - p) / N) = 0.047. A factor 2 in b_m (p = 2/3), in the mutant's death
// (p = 1/6) or in the competition (p = 0 or 1/6 ...) moves p by at least 0.17 and fails.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>

#include "leap_support.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::leaptest;

TEST_CASE("V8 a single mutant invades with probability 1 - (d + C n*)/b_m under the leap engine (Athreya & Ney 1972)",
          "[validation][V8][leap]") {
    Scenario s = validation::one_patch_scenario();
    s.K = 1e5;
    s.dormancy_axis = {1.0, 2};
    RateOverride mutant;
    mutant.dormancy = 1.0;
    mutant.birth = 6.0;
    s.rates.overrides = {mutant};
    const TraitGrid g(s.dormancy_axis, s.transfer_axis);
    const RateTable r(g, s.rates, s.K);
    const int res = *g.find(0, 0), mut = *g.find(1, 0);

    constexpr std::uint32_t N = 2500;
    std::vector<int> survived(N, 0);
    std::vector<LeapStats> stats(N);
    validation::for_replicates(N, [&](std::uint32_t rep) {
        OnePatch<LeapPatch> run(g, r, s.K, PatchConditions{}, validation::test_seed(808), rep);
        run.active[res] = static_cast<std::int64_t>(3 * s.K);
        run.active[mut] = 1;
        for (int step = 0; step < 500 && run.active[mut] > 0 && run.active[mut] < 100; ++step) run.advance(0.1);
        survived[rep] = run.active[mut] >= 100 ? 1 : 0;
        stats[rep] = run.patch.stats();
    });
    double p_hat = 0;
    std::uint64_t leaps = 0, critical = 0;
    for (std::uint32_t i = 0; i < N; ++i) {
        p_hat += survived[i];
        leaps += stats[i].leaps;
        critical += stats[i].critical_events;
    }
    p_hat /= N;
    const double p = 1 - (1.0 + 1.0 * 3.0) / 6.0;
    INFO("survival " << p_hat << " (theory " << p << "), leaps " << leaps << ", critical firings " << critical);
    CHECK(std::fabs(p_hat - p) <= validation::z_tolerance * std::sqrt(p * (1 - p) / N));
    CHECK(leaps > 0);
    CHECK(critical > 0);  // the mutant's events went through the exact critical path
}
