// The deterministic model in counts (src/theory/count_model.hpp) against closed forms: the
// mutation source term at a stationary state, schedules switching at the right times
// (logistic growth and decay in closed form, piece by piece), and the same bits for 1 and
// 2 threads on a lattice large enough for the parallel right-hand side.
//
// Tolerances: the integrator runs at 1e-9 relative per step (CountModelSettings); after a
// few hundred steps the global error stays below 1e-7 relative, which is what the checks
// allow. A rate off by a factor 2 moves every checked value by 1e-2 relative or more.
#include <catch2/catch.hpp>

#include <tbb/global_control.h>

#include <cmath>
#include <vector>

#include "core/deterministic_ode.hpp"
#include "theory/count_model.hpp"
#include "validation_support.hpp"

using namespace tessera;

namespace {

constexpr double relative_tolerance = 1e-7;

// The state at the last output time of a run of the model.
CountState final_state(const Scenario& s) {
    CountState last;
    CountModel(s).run([&](const CountState& now) { last = now; });
    return last;
}

}  // namespace

// Two traits, r = (0,0) with b_r = 4 and m = (0,2) with b_m = 3 (the default transfer cost),
// d = 1, C = 1, no transfer, no dormancy. Offspring of r mutate forward to m with
// probability mu (1 - beta) (beta = mutation_backward); m has no forward target (the grid's
// corner: no mutation happens) and mutates backward to r with probability mu beta. In
// densities the model is linear apart from the common competition term:
//   a' = M a - n a,  M = [[b_r (1 - mu (1 - beta)) - d, mu beta b_m],
//                         [mu (1 - beta) b_r,           b_m (1 - mu beta) - d]],
// so the stationary state is M's Perron eigenvector scaled to n = its eigenvalue lambda,
// the larger root of lambda^2 - tr lambda + det = 0 (closed form). With beta = 0 this is the
// resident feeding a declining mutant: A_m = mu b_r A_r / (-f), f = b_m - d - n, the
// stationary count of a subcritical branching process with immigration (Athreya & Ney
// 1972, Branching Processes).
TEST_CASE("the mutation source term reaches the closed-form stationary state, forward and backward") {
    for (double beta : {0.0, 0.3}) {
        Scenario s = validation::one_patch_scenario();
        s.transfer_axis = {2.0, 2};
        s.K = 1e4;
        s.rates.mutation_exponent = 0.5;  // mu = 0.01
        s.rates.mutation_backward = beta;
        s.inocula = {validation::inoculum(0, 0, 3e4)};
        s.until = 60.0;  // the slower mode decays like exp(-t) at least: e^-60 is far below 1e-7
        s.output_every = 10.0;
        const double mu = 0.01, br = 4, bm = 3, d = 1;
        const double m11 = br * (1 - mu * (1 - beta)) - d, m12 = mu * beta * bm;
        const double m21 = mu * (1 - beta) * br, m22 = bm * (1 - mu * beta) - d;
        const double tr = m11 + m22, det = m11 * m22 - m12 * m21;
        const double lambda = (tr + std::sqrt(tr * tr - 4 * det)) / 2;
        // Eigenvector (m12, lambda - m11) when m12 > 0, else (lambda - m22, m21).
        const double vr = m12 > 0 ? m12 : lambda - m22, vm = m12 > 0 ? lambda - m11 : m21;
        const double Ar = s.K * lambda * vr / (vr + vm), Am = s.K * lambda * vm / (vr + vm);
        const CountState last = final_state(s);
        INFO("mutation_backward = " << beta << ": resident " << last.active[0] << " (closed form " << Ar
                                    << "), mutant " << last.active[1] << " (closed form " << Am << ")");
        CHECK(last.active[0] == Approx(Ar).epsilon(relative_tolerance));
        CHECK(last.active[1] == Approx(Am).epsilon(relative_tolerance));
        if (beta == 0.0) {
            const double n = lambda, f = bm - d - n;
            CHECK(last.active[1] == Approx(mu * br * last.active[0] / -f).epsilon(relative_tolerance));
        }
    }
}

// One trait, b = 4, d = 1, C = 1: logistic growth a' = r a - a^2 with r = b - d - stress,
// whose solution is a(t) = r a0 / (a0 + (r - a0) e^{-r t}) (Verhulst; for r < 0 the same
// formula is the logistic decay). A schedule sets stress = 5 (r = -2) during [1, 2),
// repeating every 3, so the pieces are r = 3 on [0,1), -2 on [1,2), 3 on [2,4), -2 on
// [4,5), 3 on [5,6]. Outputs every 0.25: several fall inside pulses, some on switch times.
TEST_CASE("schedules switch the conditions at their own times, between output times") {
    Scenario s = validation::one_patch_scenario();
    s.K = 1e6;
    s.inocula = {validation::inoculum(0, 0, 0.5e6)};
    Schedule pulse;
    pulse.habitat = "open";
    pulse.start = 1.0;
    pulse.end = 2.0;
    pulse.every = 3.0;
    pulse.stress = 5.0;
    s.schedules = {pulse};
    s.until = 6.0;
    s.output_every = 0.25;
    const auto logistic = [](double r, double a0, double t) { return r * a0 / (a0 + (r - a0) * std::exp(-r * t)); };
    const auto closed_form = [&](double t) {
        const double switches[] = {0.0, 1.0, 2.0, 4.0, 5.0, 1e9};
        double a = 0.5;
        for (int k = 0; k < 5; ++k) {
            const double r = k % 2 == 0 ? 3.0 : -2.0;
            if (t <= switches[k + 1]) return logistic(r, a, t - switches[k]);
            a = logistic(r, a, switches[k + 1] - switches[k]);
        }
        return a;
    };
    int outputs = 0;
    CountModel(s).run([&](const CountState& now) {
        INFO("t = " << now.t);
        CHECK(now.active[0] / s.K == Approx(closed_form(now.t)).epsilon(relative_tolerance));
        ++outputs;
    });
    CHECK(outputs == 25);
}

// A 20 x 16 lattice (above DeterministicOde::parallel_min_patches) with migration, a wall
// column, conjugation, dormancy and mutation: the counts do not depend on the threads.
TEST_CASE("the parallel right-hand side gives the same bits for 1 and 2 threads") {
    REQUIRE(20 * 16 >= static_cast<int>(DeterministicOde::parallel_min_patches));
    Scenario s = validation::one_patch_scenario();
    s.dormancy_axis = {4.0, 3};
    s.transfer_axis = {4.0, 3};
    s.rates.dormancy_probability = 0.1;
    s.rates.transfer = 3.0;
    s.rates.mutation_exponent = 0.5;
    s.rates.migration = 0.4;
    s.K = 1e6;
    s.width = 20;
    s.height = 16;
    const Habitat open{}, wall{"wall", "#", "#000000", 0.0, 0.0, 1.0, 1.0};
    s.habitats = {open, wall};
    s.habitat_of_patch.assign(20 * 16, 0);
    for (int row = 2; row < 16; ++row) s.habitat_of_patch[static_cast<std::size_t>(row) * 20 + 9] = 1;
    Inoculum left = validation::inoculum(0, 0, 1e6);
    left.where = Inoculum::Where::rect;
    left.x0 = 0, left.y0 = 0, left.x1 = 2, left.y1 = 15;
    Inoculum corner = validation::inoculum(4, 4, 1e3);
    corner.where = Inoculum::Where::patch;
    corner.x0 = 19, corner.y0 = 15;
    s.inocula = {left, corner};
    s.until = 3.0;
    s.output_every = 3.0;
    const auto run_on = [&](int threads) {
        tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
        return final_state(s);
    };
    const CountState one = run_on(1), two = run_on(2);
    CHECK(one.active == two.active);
    CHECK(one.dormant == two.dormant);
    // Something moved: column 6 has cells from the inoculated columns 0-2 by now.
    double right = 0;
    for (int row = 0; row < 16; ++row) right += one.active[(static_cast<std::size_t>(row) * 20 + 6) * 9];
    CHECK(right > 1.0);
}
