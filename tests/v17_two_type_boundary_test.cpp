// V17 (validation.md): a sweep's regime boundary at the closed-form threshold of two-type
// invasion (Athreya & Ney 1972, *Branching Processes*, ch. V: a positively regular multitype
// branching process with mean matrix exp(M t) is supercritical exactly when the leading
// eigenvalue of M is positive).
//
// Setup (ours): one patch, mutation off (alpha = inf), no transfer, dormancy levels 0 and 2.
// The resident (0,0) cannot go dormant; at its equilibrium n = (b0 - d) / C active cells per
// K. An invader (2,0) at low density is a two-type process (active, dormant) with
//   M = [[g, sigma], [q C n, -(kappa + sigma)]],  g = b - d - C n = b - b0 = -c_x x,
// q = p x the chance that a competition encounter makes it dormant instead of killing it.
// tr M = g - (kappa + sigma) < 0, so the leading eigenvalue is positive iff det M < 0:
//   -g (kappa + sigma) - sigma q C n < 0   <=>   p > p* = c_x (kappa + sigma) / (sigma (b0 - d)).
// With the defaults b0 = 4, c_x = 0.5, d = 1, C = 1 and kappa = sigma = 1: p* = 1/3 (q* = 2/3).
// Above p* the invader replaces the resident: once it is resident, (0,0) has fitness
// b0 - d - C n' < 0 with n' = (b - d) / (C (1 - sigma q / (kappa + sigma))) > 3.
//
// Stochastic part (quick, always on): replicates at p = 0.2 and p = 0.5, where the leading
// eigenvalue is -0.30 and +0.30 (rates off by 2 in q, C or kappa move p* past one of them),
// classified by the sweep's own rule at the end of a run: every replicate must end with the
// closed form's resident. At p = 0.5 (q = 1) an active invader divides at 3, dies at 1 and
// turns dormant at C n = 3; a dormant one wakes at 1 and dies at 1. Its extinction
// probabilities u (active), v (dormant) solve 7u = 3u^2 + 1 + 3v, 2v = u + 1 (first-step
// analysis, Athreya & Ney ch. V), so u = 5/6: the 100-cell inoculum dies out with probability
// (5/6)^100 = 1.2e-8. At p = 0.2 it shrinks at rate 0.3 and is gone or negligible (exponent
// far below 1 - eps) long before t = 60. So a correct engine fails far less than once in 1e4.
//
// Limit part: the exponent limit over a grid of p within 0.002 of p* must switch its last
// resident exactly at p*. It is SKIPPED (with a warning) while the limit on this branch is
// the stub whose limit_not_applicable says "not built yet", and enforced once it is merged.
#include <catch2/catch.hpp>

#include <Eigen/Dense>
#include <cmath>
#include <string>
#include <vector>

#include "io/scenario_loader.hpp"
#include "study/sweep_point.hpp"
#include "theory/exponent_limit.hpp"

using namespace tessera;

namespace {

constexpr double p_star = 1.0 / 3.0;

Scenario two_type(double p, double K, const std::string& run) {
    const std::string text = R"(
title = "V17 two-type invasion: a dormancy-capable invader against a non-dormant resident"
[traits]
dormancy = { max = 2.0, levels = 2 }
transfer = { max = 0.0, levels = 1 }
[rates]
dormant_death = 1.0
resuscitation = 1.0
mutation_exponent = inf
transfer = 0.0
migration = 0.0
[[inoculum]]
trait = [0.0, 0.0]
active = )" + std::to_string(3 * K) + R"(
[[inoculum]]
trait = [2.0, 0.0]
active = 100
)" + run;
    char p_text[32];
    std::snprintf(p_text, sizeof p_text, "%.17g", p);
    char k_text[32];
    std::snprintf(k_text, sizeof k_text, "%.17g", K);
    return parse_scenario(text, "v17.toml", {std::string("rates.dormancy_probability=") + p_text,
                                              std::string("scale.K=") + k_text});
}

// The leading eigenvalue of the invader's mean matrix, by Eigen (a check of the closed form).
double leading_eigenvalue(double p) {
    const double b0 = 4, b = 3, d = 1, C = 1, kappa = 1, sigma = 1, x = 2;
    const double n = (b0 - d) / C;
    Eigen::Matrix2d M;
    M << b - d - C * n, sigma, p * x * C * n, -(kappa + sigma);
    return M.eigenvalues().real().maxCoeff();
}

}  // namespace

TEST_CASE("V17: the closed-form threshold is where the leading eigenvalue changes sign", "[v17]") {
    CHECK(leading_eigenvalue(p_star - 1e-6) < 0);
    CHECK(leading_eigenvalue(p_star + 1e-6) > 0);
    CHECK(std::abs(leading_eigenvalue(p_star)) < 1e-12);
    CHECK(leading_eigenvalue(0.2) == Approx(-0.2958).margin(1e-3));
    CHECK(leading_eigenvalue(0.5) == Approx(0.3028).margin(1e-3));
}

TEST_CASE("V17: replicates far from p* end with the closed form's resident", "[v17]") {
    const int replicates = 6;
    const std::string run = "[run]\nuntil = 60.0\ntime_unit = \"plain\"\nmethod = \"exact\"\n[output]\nevery = 1.0\nfields_every = 0\n";
    // Trait indices: (0,0) is 0, (2,0) is 1.
    for (const auto& [p, resident] : {std::pair{0.2, 0}, std::pair{0.5, 1}}) {
        Scenario s = two_type(p, 1000, run);
        s.seed = point_seed(17, p > p_star ? 1 : 0);
        for (int r = 0; r < replicates; ++r) {
            const auto result = run_replicate(s, r, RegimeSettings{});
            REQUIRE(result);
            INFO("p = " << p << ", replicate " << r);
            CHECK(result->outcome.regime == Regime::resident);
            CHECK(result->outcome.residents == std::vector<int>{resident});
        }
    }
}

TEST_CASE("V17 limit: the sweep's resident switches at the closed-form p*", "[v17][limit]") {
    const std::string run = "[run]\nuntil = 600.0\ntime_unit = \"logK\"\n[output]\nfields_every = 0\n";
    const Scenario probe = two_type(p_star, 1e6, run);
    if (const auto why = limit_not_applicable(probe); why && why->find("not built yet") != std::string::npos) {
        WARN("SKIPPED: V17 limit part: " << *why << " (enforced once the exponent limit is merged)");
        return;
    }
    REQUIRE_FALSE(limit_not_applicable(probe));
    // Invader at exponent log(100)/log(1e6) = 1/3 with fitness about 2 (p - p*): 0.002 away it
    // reaches 1 by t/lnK = 170, well inside until = 600.
    for (double dp : {-0.05, -0.002, 0.002, 0.05}) {
        const double p = p_star + dp;
        const PointResult r = limit_point(two_type(p, 1e6, run), RegimeSettings{});
        INFO("p = " << p);
        CHECK(r.outcome.regime == Regime::resident);
        CHECK(r.outcome.residents == std::vector<int>{dp > 0 ? 1 : 0});
    }
}
