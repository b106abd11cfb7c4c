// V4 (validation.md): logistic growth alone against the closed-form Verhulst solution.
//
// Source: P.-F. Verhulst (1838), "Notice sur la loi que la population suit dans son
// accroissement", Corresp. Math. Phys. 10:113-121; the closed form as in any textbook
// (e.g. J. D. Murray, Mathematical Biology I, 3rd ed., section 1.1). Volume, pages and
// section are from memory; the closed form is checked below against an RK4 solution.
// One trait, no dormancy, no transfer, no mutation: the density n = N/K obeys
// dn/dt = r n - C n^2 with r = b - d, so with carrying density n* = r/C,
//
//   N(t) = K n* n0 e^{rt} / (n* + n0 (e^{rt} - 1)).
//
// Tolerance. By the system-size expansion (van Kampen, Stochastic Processes in Physics and
// Chemistry, ch. X; the linear noise approximation, a theorem for density-dependent jump
// processes: Kurtz 1971, J. Appl. Probab. 8:344-356) N(t) is Gaussian around K n(t) with
// variance V(t) that solves (citation details from memory)
//
//   dV/dt = 2 (r - 2 C n) V + K (b + d + C n) n,   V(0) = 0 (the inoculum is exact),
//
// about b K / C = 2K on the plateau, i.e. a relative spread sqrt(2/K) = 1% at K = 2e4. The
// test compares the mean of R = 8 replicates with K n(t) and allows z_tolerance (5)
// standard errors sqrt(V/R) plus a bias allowance of 10 cells: the next order of the
// expansion shifts the mean by O(1) cells (on the plateau E N = K n* - V/(K n*) ~ -b/C = -2
// cells). That is about 1.8% of N on the plateau: a factor 2 in b, d or C moves the
// plateau by 100% or 50%, and the growth phase by much more than that.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "core/engine.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

TEST_CASE("V4 logistic growth follows the Verhulst solution", "[validation][V4]") {
    const double K = 2e4, b = 2.0, d = 1.0, C = 1.0, n0 = 0.05;
    Scenario s = one_patch_scenario();
    s.K = K;
    s.rates.birth_max = b;
    s.rates.death = d;
    s.rates.competition = C;
    s.sync = 0.05;  // the engine's step loop, not one long step
    s.inocula = {inoculum(0.0, 0.0, n0 * K)};
    s.seed = test_seed(401);

    const double r = b - d, n_star = r / C;
    auto verhulst = [&](double t) {
        const double e = std::exp(r * t);
        return n_star * n0 * e / (n_star + n0 * (e - 1));
    };
    const std::vector<double> times{1.0, 2.0, 3.0, 4.0, 6.0, 10.0};

    // The linear-noise variance, by RK4 on (n, V/K) with a step far below 1/r.
    std::vector<double> variance;
    {
        double n = n0, w = 0.0, t = 0.0;  // w = V / K
        auto f = [&](double nn, double ww, double& dn, double& dw) {
            dn = r * nn - C * nn * nn;
            dw = 2 * (r - 2 * C * nn) * ww + (b + d + C * nn) * nn;
        };
        const double h = 1e-3;
        for (double target : times) {
            while (t < target - 1e-12) {
                double k1n, k1w, k2n, k2w, k3n, k3w, k4n, k4w;
                f(n, w, k1n, k1w);
                f(n + h / 2 * k1n, w + h / 2 * k1w, k2n, k2w);
                f(n + h / 2 * k2n, w + h / 2 * k2w, k3n, k3w);
                f(n + h * k3n, w + h * k3w, k4n, k4w);
                n += h / 6 * (k1n + 2 * k2n + 2 * k3n + k4n);
                w += h / 6 * (k1w + 2 * k2w + 2 * k3w + k4w);
                t += h;
            }
            REQUIRE(n == Approx(verhulst(target)).epsilon(1e-8));  // the closed form, checked
            variance.push_back(w * K);
        }
    }

    const std::uint32_t R = 8;
    const auto seen = observe_at_times(
        s, times, R, [](const Engine& engine) { return static_cast<double>(engine.lattice().active(0)[0]); });

    for (std::size_t k = 0; k < times.size(); ++k) {
        double mean = 0;
        for (double v : seen[k]) mean += v;
        mean /= R;
        const double expected = K * verhulst(times[k]);
        const double tolerance = z_tolerance * std::sqrt(variance[k] / R) + 10.0;
        INFO("z = " << (mean - expected) / std::sqrt(variance[k] / R) << " at t = " << times[k]
                    << ": mean of " << R << " replicates " << mean << ", Verhulst "
                    << expected << ", tolerance " << tolerance << " (sd of one replicate "
                    << std::sqrt(variance[k]) << ")");
        CHECK(std::fabs(mean - expected) <= tolerance);
    }
}
