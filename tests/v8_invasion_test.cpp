// V8 (validation.md): a single mutant invading a resident at equilibrium.
//
// Source: K. B. Athreya & P. E. Ney (1972), Branching Processes, Springer, ch. I (the
// extinction probability of a supercritical Galton-Watson process is the smallest root of
// f(s) = s) and ch. III (the embedded chain of a linear birth-death process: a cell divides
// with probability b / (b + mu), so extinction has probability mu / b; chapter numbers
// from memory). While the mutant is rare the resident holds its equilibrium density
// n* = (b_r - d_r) / C, so each mutant cell divides at rate b_m and dies at rate
// mu = d_m + C n*; the invasion probability is
//
//   P(invade) = 1 - (d_m + C n*) / b_m.
//
// Here resident (b_r, d_r) = (2, 1), mutant (b_m, d_m) = (3, 0.5), C = 1: n* = 1,
// mu = 1.5, P = 1/2. (A mutant death rate that differs from the resident's keeps P
// sensitive to global rate errors: a factor 2 in every birth gives P = 5/12, in every death
// P = 1/3; a factor 2 in C cancels against n*, as it must: P depends on C n* only.)
//
// Invasion is measured as "the mutant is seen at >= M = 100 cells (checks every 0.1 time
// units) before it is lost". For the branching process, P(reach M before 0) =
// (1 - rho) / (1 - rho^M) with rho = mu / b_m (gambler's ruin on the embedded chain), and
// the test uses that exact value; it differs from 1 - rho by rho^M = 8e-31. Lineages seen
// at >= M could still die, with probability rho^M: also negligible.
//
// Tolerance. The estimate is a binomial proportion over N = 4000 replicates:
// z_tolerance (5) standard errors sqrt(P (1 - P) / N) = 0.040, plus an allowance of 0.01
// for what the branching approximation leaves out at K = 1000: the resident fluctuates
// around n* by sqrt(b_r / (C K)) = 4.5% (a second-order effect on P, ~2/K ~ 0.002), and the
// mutant's own cells add to competition (about m / K while it has m cells; its fate is
// settled by m ~ 10, so a shift of mu by <= 1%, i.e. of P by <= 0.005).
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

TEST_CASE("V8 a single fitter mutant invades with the branching-process probability",
          "[validation][V8]") {
    const double K = 1000, C = 1.0;
    const double b_r = 2.0, d_r = 1.0, b_m = 3.0, d_m = 0.5;
    const double n_star = (b_r - d_r) / C;
    const double rho = (d_m + C * n_star) / b_m;
    const int M = 100;
    const double p_invade = (1 - rho) / (1 - std::pow(rho, M));

    Scenario s = one_patch_scenario();
    s.K = K;
    s.transfer_axis = {1.0, 2};  // resident y = 0, mutant y = 1; tau = 0: y only labels
    s.rates.competition = C;
    RateOverride resident, mutant;
    resident.transfer = 0.0;
    resident.birth = b_r;
    resident.death = d_r;
    mutant.transfer = 1.0;
    mutant.birth = b_m;
    mutant.death = d_m;
    s.rates.overrides = {resident, mutant};
    const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
    const RateTable rates(grid, s.rates, s.K);
    REQUIRE(rates.transfer == 0.0);
    REQUIRE(rates.mutation_probability == 0.0);

    const std::uint32_t N = 4000;
    const std::uint64_t seed = test_seed(801);
    std::vector<std::uint8_t> invaded(N, 0), undecided(N, 0);
    for_replicates(N, [&](std::uint32_t rep) {
        PatchRun run(grid, rates, K, PatchConditions{}, seed, rep);
        // The resident starts at K n*, its deterministic equilibrium, and settles into its
        // quasi-stationary spread first (the variance relaxes at rate 2 (b_r - d_r) = 2, so
        // 2 time units leave e^-4 of the gap).
        run.active[0] = static_cast<std::int64_t>(K * n_star);
        run.advance(2.0);
        run.active[1] = 1;
        for (int i = 0; i < 10000 && run.active[1] > 0 && run.active[1] < M; ++i) run.advance(0.1);
        invaded[rep] = run.active[1] >= M ? 1 : 0;
        undecided[rep] = run.active[1] > 0 && run.active[1] < M ? 1 : 0;
    });
    double p = 0, open = 0;
    for (std::uint32_t r = 0; r < N; ++r) {
        p += invaded[r];
        open += undecided[r];
    }
    p /= N;
    REQUIRE(open == 0);  // every mutant lineage was settled within the time limit
    const double tolerance = z_tolerance * std::sqrt(p_invade * (1 - p_invade) / N) + 0.01;
    INFO("invasion in " << p * 100 << "% of " << N << " replicates, branching process "
                        << p_invade * 100 << "%, tolerance " << tolerance * 100 << " points");
    CHECK(std::fabs(p - p_invade) <= tolerance);
}
