// V6 (validation.md): migration only, two patches side by side (a 2 x 1 lattice, reflecting
// edges, 4-neighbourhood, no local events).
//
// Source: the two-state Markov chain, S. Karlin & H. M. Taylor (1975), A First Course in
// Stochastic Processes, 2nd ed., Academic Press (the two-state chain, ch. 4 in continuous
// time and ch. 2 in discrete time; chapter numbers from memory). Cells move independently,
// so the count in a patch is a sum of two binomials, one per starting patch.
//
// Continuous time (method "exact-spatial"): an active cell jumps at rate m * permeability
// of its patch to one of 4 directions chosen uniformly; on a 2 x 1 lattice with reflecting
// edges three of them are cancelled, so patch 0 -> 1 happens at rate a = m pi0 / 4 and
// 1 -> 0 at b = m pi1 / 4. With s = a + b:
//   P(in 1 at t | in 0 at 0) = a/s (1 - e^{-s t}),  P(in 1 at t | in 1 at 0) = 1 - b/s (1 - e^{-s t}).
// Split engine (method "exact", n steps of length dt = sync): each step a cell leaves with
// probability 1 - e^{-m pi dt} and takes a uniform direction, so it is the discrete-time
// chain with a' = (1 - e^{-m pi0 dt}) / 4, b' likewise, and
//   P(in 1 after n | in 0) = a'/(a' + b') (1 - (1 - a' - b')^n)
// exactly, for any dt; it tends to the continuous law as dt -> 0 (checked below too).
// Dormant cells move the same way at rate m_dormant.
//
// Tolerances: z_tolerance (5) exact standard errors for the mean and the sample variance
// (the fourth moment from the exact law), and a chi-squared test of the whole law of the
// count (size chi_squared_alpha). With the replicates used, a factor 2 in the migration
// rate moves the mean by more than 50 standard errors, and treating the 3 cancelled
// directions as moves (rate m instead of m/4) by hundreds.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <vector>

#include "spatial_support.hpp"

using namespace tessera;
using namespace tessera::spatial;
using namespace tessera::validation;

namespace {

struct TwoPatch {
    double m = 0.0, m_dormant = 0.0;  // migration rates
    double pi0 = 1.0, pi1 = 1.0;      // permeabilities of patch 0 and patch 1
    int active0 = 0, active1 = 0, dormant0 = 0, dormant1 = 0;
    double t = 1.5;

    // P(a cell that starts in `from` is in patch 1 at time t), for jump rate `rate`;
    // dt = 0 is the continuous chain, dt > 0 the split engine's discrete one.
    double p_in_1(int from, double rate, double dt) const {
        double a, b, decay;
        if (dt > 0) {
            a = -std::expm1(-rate * pi0 * dt) / 4;
            b = -std::expm1(-rate * pi1 * dt) / 4;
            decay = std::pow(1 - a - b, std::round(t / dt));
        } else {
            a = rate * pi0 / 4;
            b = rate * pi1 / 4;
            decay = std::exp(-(a + b) * t);
        }
        const double s = a + b;
        return from == 0 ? a / s * (1 - decay) : 1 - b / s * (1 - decay);
    }
    // The law of the count in patch 1 of one compartment.
    std::vector<double> law(bool dormant, double dt) const {
        const double rate = dormant ? m_dormant : m;
        const int n0 = dormant ? dormant0 : active0, n1 = dormant ? dormant1 : active1;
        return convolve(binomial_pmf(n0, p_in_1(0, rate, dt)), binomial_pmf(n1, p_in_1(1, rate, dt)));
    }

    Scenario scenario(Method method, double sync, std::uint64_t seed) const {
        Scenario s = quiet_lattice(2, 1);
        s.rates.migration = m;
        s.rates.migration_dormant = m_dormant;
        // Aggregate initialisation: (name, symbol, colour, capacity, stress, resuscitation,
        // permeability); assigning strings trips GCC 12's false -Wrestrict.
        s.habitats = {Habitat{"left", "l", "#102030", 1.0, 0.0, 1.0, pi0},
                      Habitat{"right", "r", "#302010", 1.0, 0.0, 1.0, pi1}};
        s.habitat_of_patch = {0, 1};
        s.inocula = {cells_at(0, 0, active0, dormant0), cells_at(1, 0, active1, dormant1)};
        s.method = method;
        s.sync = sync;
        s.until = t;
        s.seed = seed;
        return s;
    }
};

struct Sample {
    std::vector<double> active, dormant;  // counts in patch 1 at t, per replicate
    std::vector<std::uint8_t> balanced;   // per replicate: no cell made, lost or destroyed
};

Sample simulate(const TwoPatch& c, Method method, double sync, std::uint32_t replicates, std::uint64_t seed) {
    const Scenario s = c.scenario(method, sync, seed);
    Sample out{std::vector<double>(replicates), std::vector<double>(replicates),
               std::vector<std::uint8_t>(replicates)};
    for_replicates(replicates, [&](std::uint32_t r) {
        Engine e(s, r);
        e.advance_to(c.t);
        out.active[r] = static_cast<double>(active_in(e, 1));
        out.dormant[r] = static_cast<double>(dormant_in(e, 1));
        // Nothing is born, dies or is lost: the books must balance exactly. (Catch's macros
        // are not thread-safe, so the verdict is checked after the parallel loop.)
        out.balanced[r] = active_in(e, 0) + out.active[r] == c.active0 + c.active1 &&
                          dormant_in(e, 0) + out.dormant[r] == c.dormant0 + c.dormant1 && e.lost() == 0;
    });
    CHECK(std::count(out.balanced.begin(), out.balanced.end(), std::uint8_t{1}) == replicates);
    return out;
}

void check_law(const std::vector<double>& seen, const std::vector<double>& pmf, const char* what) {
    const Moments exact = pmf_moments(pmf);
    const Moments got = sample_moments(seen);
    INFO(what << ": mean " << got.mean << " (law " << exact.mean << "), variance " << got.variance << " (law "
              << exact.variance << ")");
    CHECK(std::fabs(got.mean - exact.mean) <= z_tolerance * std::sqrt(exact.variance / got.n));
    CHECK(std::fabs(got.variance - exact.variance) <=
          z_tolerance * variance_standard_error(exact.variance, exact.mu4, got.n));
    const ChiSquared chi =
        chi_squared_test(pmf, histogram(seen, pmf.size()), seen.size(), chi_squared_alpha);
    INFO(chi.describe());
    CHECK(chi.passed());
}

void check_both_engines(const TwoPatch& c, std::uint64_t seed, bool dormant_too) {
    constexpr std::uint32_t R = 6000;
    constexpr double sync = 0.01;
    {
        const Sample exact = simulate(c, Method::exact_spatial, 0.5, R, test_seed(seed));
        if (c.m > 0) check_law(exact.active, c.law(false, 0.0), "exact-spatial, active");
        if (dormant_too) check_law(exact.dormant, c.law(true, 0.0), "exact-spatial, dormant");
    }
    {
        const Sample split = simulate(c, Method::exact, sync, R, test_seed(seed + 1));
        if (c.m > 0) check_law(split.active, c.law(false, sync), "split, active");
        if (dormant_too) check_law(split.dormant, c.law(true, sync), "split, dormant");
    }
}

}  // namespace

TEST_CASE("V6 the split law tends to the continuous two-state chain as sync shrinks", "[validation][V6]") {
    TwoPatch c;
    c.m = 1.2;
    c.pi0 = 0.5;
    c.pi1 = 2.0;
    for (int from = 0; from < 2; ++from) {
        const double exact = c.p_in_1(from, c.m, 0.0);
        const double coarse = std::fabs(c.p_in_1(from, c.m, 0.05) - exact);
        const double fine = std::fabs(c.p_in_1(from, c.m, 0.005) - exact);
        CHECK(fine < coarse / 5);  // first order in dt: 10 times smaller dt, about 10 times closer
        CHECK(fine < 2e-3);
    }
}

TEST_CASE("V6 active and dormant cells hop between two patches as two-state chains", "[validation][V6]") {
    TwoPatch c;
    c.m = 1.2;
    c.m_dormant = 0.6;
    c.active0 = 120;
    c.active1 = 40;
    c.dormant0 = 60;
    c.dormant1 = 10;
    check_both_engines(c, 601, true);
}

TEST_CASE("V6 permeability scales the rate out of each patch", "[validation][V6]") {
    TwoPatch c;
    c.m = 1.2;
    c.pi0 = 0.5;  // slow to leave the left patch, quick to leave the right one
    c.pi1 = 2.0;
    c.active0 = 150;
    c.active1 = 30;
    check_both_engines(c, 611, false);
}

TEST_CASE("V6 dormant cells migrate alone when active ones do not", "[validation][V6]") {
    TwoPatch c;
    c.m = 0.0;
    c.m_dormant = 0.9;
    c.pi0 = 1.5;
    c.active0 = 50;  // must stay put
    c.dormant0 = 100;
    c.dormant1 = 20;
    check_both_engines(c, 621, true);
    const Sample s = simulate(c, Method::exact, 0.01, 200, test_seed(631));
    for (double a : s.active) CHECK(a == 0.0);
}
