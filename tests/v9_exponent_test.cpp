// V9 (validation.md): on the t / ln K scale, a sub-population started at K^beta0 that grows
// at net rate lambda has exponent beta(s) = log(1 + A + D) / log K close to beta0 + lambda s
// (model.md section 4), run with the leap engine at K = 1e8 and 1e12.
//
// Source: a fact of the trade (large-population asymptotics of branching processes,
// common practice in the adaptive-dynamics literature): a linear birth-death process from
// n0 = K^beta0 cells has A(t) = n0 e^{lambda t} (1 + O(n0^-1/2)), so
// log A / log K = beta0 + lambda t / log K + O(n0^-1/2 / log K).
//
// System: one patch, three traits on the transfer axis with no conjugation, mutation or
// dormancy: a resident (birth 4) at its equilibrium 3 K (n* = (b - d) / C), and two rare
// traits at K^0.5 that feel the resident's competition C n* = 3: one with birth 5
// (lambda = 5 - 1 - 3 = +1) and one with birth 3 (lambda = -1). Checked at
// s = 0.05 .. 0.25.
//
// Tolerance: the exponent of the growing trait within 0.01 of beta0 + lambda s, of the
// declining one within 0.06, of the resident within 0.005 of log(3K)/log K. The standard
// deviation of log A is about sqrt((b + d) / (|lambda| n)) at the smallest n reached (100
// cells for the declining trait at K = 1e8: 0.26, i.e. 0.014 in exponent units; the
// growing one: 0.03 / 18 = 0.002), so these are more than 4 standard deviations, plus the
// bias of the leaps (Euler-like, lambda^2 tau / 2 per unit time, below 0.002 here). A
// factor 2 in any one rate changes some lambda by at least 0.5 (e.g. the resident's C n*
// by 1.5, a birth rate by 2.5 or more, the death rate by 1), i.e. an exponent by 0.1 at
// s = 0.2, and fails.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>

#include "core/engine.hpp"
#include "validation_support.hpp"

using namespace tessera;

namespace {

Scenario exponent_scenario(double K) {
    Scenario s = validation::one_patch_scenario();
    s.K = K;
    s.transfer_axis = {4.0, 3};
    s.rates.birth_cost_transfer = 0.0;
    s.rates.transfer = 0.0;
    RateOverride grower;
    grower.transfer = 2.0;
    grower.birth = 5.0;
    RateOverride decliner;
    decliner.transfer = 4.0;
    decliner.birth = 3.0;
    s.rates.overrides = {grower, decliner};
    s.method = Method::leap;
    s.sync = 0.05;
    s.seed = validation::test_seed(91);
    Inoculum resident = validation::inoculum(0, 0, 3 * K);
    Inoculum up = validation::inoculum(0, 2, 0);
    up.active.reset();
    up.exponent = 0.5;
    Inoculum down = up;
    down.transfer = 4;
    s.inocula = {resident, up, down};
    return s;
}

double exponent(const Engine& e, int trait) {
    const double n = static_cast<double>(e.lattice().active(0)[trait] + e.lattice().dormant(0)[trait]);
    return std::log1p(n) / std::log(e.scenario().K);
}

}  // namespace

TEST_CASE("V9 exponents move at slope lambda on the t / ln K scale (leap engine)", "[validation][V9]") {
    for (double K : {1e8, 1e12}) {
        const Scenario s = exponent_scenario(K);
        Engine engine(s);
        const double logK = std::log(K);
        for (double sc : {0.05, 0.1, 0.15, 0.2, 0.25}) {
            engine.advance_to(sc * logK);
            INFO("K = " << K << ", s = " << sc << ": exponents " << exponent(engine, 0) << ", "
                        << exponent(engine, 1) << ", " << exponent(engine, 2));
            CHECK(std::fabs(exponent(engine, 0) - std::log(3 * K) / logK) <= 0.005);
            CHECK(std::fabs(exponent(engine, 1) - (0.5 + 1.0 * sc)) <= 0.01);
            CHECK(std::fabs(exponent(engine, 2) - (0.5 - 1.0 * sc)) <= 0.06);
        }
    }
}
