// A fast small species inside leaps (src/core/leap_fast_species.cpp): back-mutants of a huge
// donor trait, converted back at once by density-dependent transfer, are an immigration-
// death process with immigration lambda and per-cell departure delta (plus rare births b).
// Its stationary law is Poisson(lambda / delta) for b = 0, the M/M/infinity queue (Karlin &
// Taylor 1975, A First Course in Stochastic Processes, ch. 4; Kleinrock 1975, Queueing
// Systems I, sec. 3.8), with mean lambda / (delta - b) for the linear birth-death process
// with immigration (Kendall 1948, Ann. Math. Statist. 19:1-15), whose variance/mean is
// delta / (delta - b) = 1.0004 here, far inside what the chi-squared test can see with 2000
// replicates. These rates would cost an exact simulation 4e9 events per unit time; the leap
// engine must draw the species in O(1) per leap and still get its law and its conversions.
//
// Setup: traits (0,0) and (0,4); (0,4) holds A = 1e9 cells at K = 1e6 and is held critical
// (death overridden to its birth rate 2), mutation probability mu = K^(-2/3) = 1e-4, every
// mutation backward (to (0,0)); density-form transfer tau = 10, so a (0,0) cell is converted
// at tau A / K = 1e4 per unit time and dies at 1: delta = 10001, b = 4, lambda = mu 2 A =
// 2e5, mean count 20.006. Tolerances: chi-squared of size validation::chi_squared_alpha and
// the mean number of conversions within 5 standard errors (validation_support.hpp's budget).
// A factor of 2 in delta, lambda or the conversion share moves the mean by 2x.
#include <catch2/catch.hpp>

#include <boost/math/distributions/poisson.hpp>

#include <cmath>
#include <cstdint>
#include <vector>

#include "core/engine.hpp"
#include "io/scenario_loader.hpp"
#include "leap_support.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::leaptest;

TEST_CASE("a fast small species inside leaps follows the immigration-death law, in O(1) draws per leap") {
    Scenario s = validation::one_patch_scenario();
    s.K = 1e6;
    s.transfer_axis = {4.0, 2};
    s.rates.transfer = 10.0;
    s.rates.transfer_form = TransferForm::density;
    s.rates.competition = 0.0;
    s.rates.mutation_exponent = 2.0 / 3.0;
    s.rates.mutation_backward = 1.0;
    RateOverride critical;
    critical.transfer = 4.0;
    critical.death = 2.0;  // = its birth rate 4 - 0.5 * 4
    s.rates.overrides = {critical};
    const TraitGrid g(s.dormancy_axis, s.transfer_axis);
    const RateTable r(g, s.rates, s.K);
    const int recipient = g.index(0, 0), donor = g.index(0, 1);
    const double A = 1e9, mu = r.mutation_probability;
    REQUIRE(mu == Approx(1e-4).epsilon(1e-9));
    const double lambda = mu * 2.0 * A, conversion = s.rates.transfer * A / s.K, delta = conversion + 1.0, b = 4.0;
    const double mean = lambda / (delta - b);
    const double t_end = 0.2;
    // Expected conversions over [0, t_end] from an empty start: the share conversion / delta
    // of the departures delta * integral of E n(t) = mean (1 - e^{-(delta - b) t}).
    const double expected_conversions =
        conversion * mean * (t_end - (1 - std::exp(-(delta - b) * t_end)) / (delta - b));

    constexpr std::uint32_t R = 2000;
    std::vector<std::int64_t> end_count(R);
    std::vector<double> conversions(R);
    std::vector<std::uint64_t> fast(R), exact_events(R);
    std::vector<std::uint8_t> books_kept(R);
    validation::for_replicates(R, [&](std::uint32_t rep) {
        OnePatch<LeapPatch> run(g, r, s.K, PatchConditions{}, validation::test_seed(4242), rep);
        run.active[donor] = static_cast<std::int64_t>(A);
        for (int step = 0; step < 20; ++step) run.advance(t_end / 20);  // sync steps of 0.01
        end_count[rep] = run.active[recipient];
        // The books (initial + births - deaths = now; conversions move cells between traits).
        const EventCounts& c = run.counts;
        books_kept[rep] = run.total() == static_cast<std::int64_t>(A) + static_cast<std::int64_t>(c.births) -
                                             static_cast<std::int64_t>(c.deaths + c.competition_deaths + c.dormant_deaths);
        conversions[rep] = static_cast<double>(run.counts.conjugations);
        fast[rep] = run.patch.stats().fast_resolutions;
        exact_events[rep] = run.patch.stats().critical_events + run.patch.stats().exact_events;
    });

    // Drawn in closed form (at least once per sync step), not event by event: 4e4 arrivals
    // and conversions per replicate would otherwise be exact events.
    for (std::uint32_t rep = 0; rep < R; ++rep) {
        REQUIRE(fast[rep] >= 20);
        REQUIRE(exact_events[rep] < 1000);
        REQUIRE(books_kept[rep]);
    }

    const boost::math::poisson_distribution<double> law(mean);
    std::vector<double> p;
    std::vector<std::uint64_t> observed;
    for (int n = 0; n < 60; ++n) {
        p.push_back(boost::math::pdf(law, n));
        observed.push_back(0);
    }
    for (std::int64_t n : end_count) {
        if (n < 60) ++observed[static_cast<std::size_t>(n)];
    }
    const auto chi = validation::chi_squared_test(p, observed, R, validation::chi_squared_alpha);
    INFO(chi.describe() << "; mean " << mean);
    CHECK(chi.passed());

    const Moments m = moments(conversions);
    INFO("conversions: mean " << m.mean << " +- " << m.se_mean << ", expected " << expected_conversions);
    CHECK(std::fabs(m.mean - expected_conversions) < validation::z_tolerance * m.se_mean);
}

// docs/reliability.md's known slow case, now in time proportional to simulated time: with
// competition 0, density-form transfer and backward mutation, (0,4) grows to 3.6e12 cells
// by t = 14 at K = 1e6 and its back-mutants (0,2) turn over at ~3.6e7 per cell. This took
// 120 s to reach t = 14.8 (300 s to t = 14.2 on a busy machine) before fast species were
// drawn in closed form; ctest's TIMEOUT on this test (tests/CMakeLists.txt) is the guard
// against that coming back. At the end (0,2) must sit near its immigration-death mean
// lambda / delta, which here is mu * back * b(0,4) * A(0,4) / (tau L_4 / K) = 100 within a
// few percent (the level-4 donors are (0,4) and 0.1 % of others): 5 Poisson standard
// deviations (50) is the tolerance.
TEST_CASE("the slow case of docs/reliability.md runs to its end") {
    const Scenario s = parse_scenario(
        "[rates]\ncompetition = 0\ntransfer_form = \"density\"\nmutation_backward = 0.5\n[scale]\nK = 1e6\n"
        "[run]\nuntil = 14.8\ntime_unit = \"plain\"\nmethod = \"leap\"\n",
        "slow.toml");
    Engine engine(s);
    engine.advance_to(engine.until());
    REQUIRE(engine.time() == Approx(14.8));
    const TraitGrid& g = engine.traits();
    const std::int64_t back_mutants = engine.lattice().active(0)[g.index(0, 1)];
    CHECK(std::llabs(back_mutants - 100) < 50);
}
