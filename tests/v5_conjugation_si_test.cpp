// V5 (validation.md): conjugation between two otherwise equal traits.
//
// Source: the SI epidemic model, R. M. Anderson & R. M. May (1991), Infectious Diseases of
// Humans: Dynamics and Control, Oxford University Press, ch. 2, chapter from memory (a
// susceptible becomes infected at rate beta S I / N; with no recovery the infected
// fraction is logistic). Here recipients (y = 0) are the susceptibles and donors
// (y = max) the infected. In the frequency form a recipient-donor pair conjugates at rate
// tau / Na (model.md section 2), so the donor fraction f obeys df/dt = tau f (1 - f),
//
//   f(t) = f0 e^{tau t} / (1 - f0 + f0 e^{tau t}).
//
// Births, deaths and competition are made equal for both traits with rate overrides, and
// q = 0 (one dormancy level): then they leave f unchanged on average, exactly (the
// expected change of f from any division or death is 0 whatever Na is), so the mean of f
// follows the closed form up to O(1/N) from the curvature of tau f (1 - f).
//
// Tolerance. By the linear noise approximation (van Kampen, Stochastic Processes in
// Physics and Chemistry, ch. X) f(t) is Gaussian around the closed form with variance v
// that solves, at the population's equilibrium size N = K (b - d) / C,
//
//   dv/dt = 2 tau (1 - 2 f) v + (b + (d + C N/K) + tau) f (1 - f) / N,   v(0) = 0:
//
// each division or death moves f by about f(1-f)-weighted 1/N steps, each conjugation by
// 1/N. The test allows z_tolerance (5) standard errors sqrt(v / R) of the mean of R
// replicates, plus 1e-3 for the O(1/N) terms the approximation drops (N = 2e4 here, so
// they are ~5e-5). With C = 0.5 the population sits at N = 2K, so the frequency form
// (tau / Na) and the density form (tau / K) differ by a factor 2 in rate: the test
// tells them apart, and catches a factor 2 in tau, by margins of 0.1 in f.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "core/engine.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

TEST_CASE("V5 donor fraction under conjugation follows the SI closed form", "[validation][V5]") {
    const double K = 1e4, b = 2.0, d = 1.0, C = 0.5, tau = 1.0, f0 = 0.05;
    const double N = K * (b - d) / C;  // 2e4 cells: the resident equilibrium
    Scenario s = one_patch_scenario();
    s.K = K;
    s.transfer_axis = {2.0, 2};  // recipients y = 0, donors y = 2
    s.rates.birth_max = b;
    s.rates.birth_cost_transfer = 0.5;  // overridden below: the traits differ only in y
    s.rates.death = d;
    s.rates.competition = C;
    s.rates.transfer = tau;
    s.rates.transfer_form = TransferForm::frequency;
    RateOverride donor;
    donor.dormancy = 0.0;
    donor.transfer = 2.0;
    donor.birth = b;
    s.rates.overrides = {donor};
    s.sync = 0.05;
    s.inocula = {inoculum(0.0, 0.0, std::round((1 - f0) * N)), inoculum(0.0, 2.0, std::round(f0 * N))};
    s.seed = test_seed(501);
    {
        const TraitGrid g(s.dormancy_axis, s.transfer_axis);
        const RateTable rt(g, s.rates, s.K);
        REQUIRE(rt.birth[0] == rt.birth[1]);  // the override makes the traits equal
    }

    auto closed_form = [&](double t) {
        const double e = std::exp(tau * t);
        return f0 * e / (1 - f0 + f0 * e);
    };
    const std::vector<double> times{1.0, 2.0, 3.0, 4.0, 6.0};

    std::vector<double> variance;  // of f, by RK4 along the closed form
    {
        double v = 0.0, t = 0.0;
        const double h = 1e-3;
        auto dv = [&](double tt, double vv) {
            const double f = closed_form(tt);
            return 2 * tau * (1 - 2 * f) * vv + (2 * b + tau) * f * (1 - f) / N;
        };
        for (double target : times) {
            while (t < target - 1e-12) {
                const double k1 = dv(t, v), k2 = dv(t + h / 2, v + h / 2 * k1),
                             k3 = dv(t + h / 2, v + h / 2 * k2), k4 = dv(t + h, v + h * k3);
                v += h / 6 * (k1 + 2 * k2 + 2 * k3 + k4);
                t += h;
            }
            variance.push_back(v);
        }
    }

    const std::uint32_t R = 6;
    const auto seen = observe_at_times(s, times, R, [](const Engine& engine) {
        const std::int64_t* a = engine.lattice().active(0);
        return static_cast<double>(a[1]) / static_cast<double>(a[0] + a[1]);
    });

    for (std::size_t k = 0; k < times.size(); ++k) {
        double mean = 0;
        for (double f : seen[k]) mean += f;
        mean /= R;
        const double tolerance = z_tolerance * std::sqrt(variance[k] / R) + 1e-3;
        INFO("z = " << (mean - closed_form(times[k])) / std::sqrt(variance[k] / R) << " at t = "
                    << times[k] << ": mean donor fraction of " << R << " replicates " << mean
                    << ", SI closed form " << closed_form(times[k]) << ", tolerance " << tolerance);
        CHECK(std::fabs(mean - closed_form(times[k])) <= tolerance);
    }
}
