// Shared pieces of the validation tests (validation.md): one-patch scenarios built in code,
// replicate loops that give the same answer for any thread count, the seed policy, and a
// Pearson chi-squared goodness-of-fit test with pooling of sparse bins.
//
// Seed policy: CI uses the fixed seed each test names, but every tolerance is set so that
// a correct engine fails less than once in 10^4 runs for any seed. To check that claim,
// run the tests with TESSERA_TEST_SEED=<n> for many n: the seed then replaces every fixed
// seed (mixed with the test's own, so different tests still get different streams).
#pragma once

#include <tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <functional>
#include <limits>
#include <numeric>
#include <string>
#include <vector>

#include <boost/math/distributions/chi_squared.hpp>

#include "core/engine.hpp"
#include "core/exact_patch.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera::validation {

// The error budget. A correct engine must fail the whole validation set less than once in
// 10^4 runs. The statistical checks of V1, V2, V4, V5 and V8 are 38 moment or proportion
// checks, each allowing z_tolerance = 5 standard errors (two-sided normal tail 5.7e-7),
// and 13 chi-squared tests of size chi_squared_alpha = 1e-7: 38 x 5.7e-7 + 13 x 1e-7 =
// 2.3e-5 by the Bonferroni bound. The margin of 4 covers the normal and chi-squared
// approximations being less accurate that far in the tail (Pearson's statistic with
// expected counts >= 5 has a somewhat heavier tail than chi-squared). Counted by seeds:
// 40 values of TESSERA_TEST_SEED ran every test without a failure, and the chi-squared
// p-values and z-scores they gave were uniform and standard normal.
inline constexpr double z_tolerance = 5.0;
inline constexpr double chi_squared_alpha = 1e-7;

// The seed of a test: `fixed` in CI, or derived from TESSERA_TEST_SEED when set.
inline std::uint64_t test_seed(std::uint64_t fixed) {
    if (const char* s = std::getenv("TESSERA_TEST_SEED")) {
        // splitmix64 finaliser: distinct tests keep distinct streams for the same env seed.
        std::uint64_t z = std::strtoull(s, nullptr, 10) * 0x9E3779B97F4A7C15ull + fixed;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
        return z ^ (z >> 31);
    }
    return fixed;
}

// A 1x1 lattice of the default habitat, plain time, every mechanism that a test does not
// ask for switched off: no mutation, no transfer, no migration, no dormancy (p = 0), one
// level on each trait axis. Tests switch on what they check.
inline Scenario one_patch_scenario() {
    Scenario s;
    s.title = "validation";
    s.dormancy_axis = {0.0, 1};
    s.transfer_axis = {0.0, 1};
    s.rates.dormancy_probability = 0.0;
    s.rates.transfer = 0.0;
    s.rates.mutation_exponent = std::numeric_limits<double>::infinity();
    s.rates.migration = 0.0;
    s.rates.migration_dormant = 0.0;
    s.width = 1;
    s.height = 1;
    s.habitats = {Habitat{}};
    s.habitat_of_patch = {0};
    s.time_unit = TimeUnit::plain;
    s.method = Method::exact;
    s.sync = 1.0;
    s.output_every = 1.0;
    s.fields_every = 0.0;
    return s;
}

inline Inoculum inoculum(double x, double y, double active, double dormant = 0.0) {
    Inoculum in;
    in.where = Inoculum::Where::all;
    in.dormancy = x;
    in.transfer = y;
    in.active = active;
    in.dormant = dormant;
    return in;
}

// One replicate of a one-patch system run with ExactPatch directly. Each replicate owns
// the stream (seed, replicate, patch 0) and counts its own steps, so results do not
// depend on which thread runs it.
struct PatchRun {
    const TraitGrid& grid;
    const RateTable& rates;
    double K;
    PatchConditions where;
    std::uint64_t seed;
    std::uint32_t replicate;

    std::vector<std::int64_t> active;
    std::vector<std::int64_t> dormant;
    EventCounts counts;
    std::uint64_t step = 0;
    ExactPatch patch;

    PatchRun(const TraitGrid& g, const RateTable& r, double k, PatchConditions w, std::uint64_t s,
             std::uint32_t rep)
        : grid(g), rates(r), K(k), where(w), seed(s), replicate(rep),
          active(static_cast<std::size_t>(g.size()), 0), dormant(active.size(), 0), patch(g, r, k) {}

    void advance(double duration) {
        Rng rng(StreamKey{seed, replicate, 0}, step++, Phase::local);
        patch.advance(active.data(), dormant.data(), where, duration, rng, counts);
    }
    std::int64_t active_total() const { return std::accumulate(active.begin(), active.end(), std::int64_t{0}); }
    std::int64_t dormant_total() const { return std::accumulate(dormant.begin(), dormant.end(), std::int64_t{0}); }
};

// Runs body(replicate) for replicate = 0..n-1 in parallel. Bodies write only their own
// slot of the caller's output, so the result is the same for any thread count.
inline void for_replicates(std::uint32_t n, const std::function<void(std::uint32_t)>& body) {
    tbb::parallel_for(std::uint32_t{0}, n, [&](std::uint32_t r) { body(r); });
}

// What `observe(engine)` reads from a whole Engine run of each replicate of `s` at each of
// `times` (increasing): seen[time][replicate], the same for any thread count.
template <class Observe>
std::vector<std::vector<double>> observe_at_times(const Scenario& s, const std::vector<double>& times,
                                                  std::uint32_t replicates, const Observe& observe) {
    std::vector<std::vector<double>> seen(times.size(), std::vector<double>(replicates));
    for_replicates(replicates, [&](std::uint32_t rep) {
        Engine engine(s, rep);
        for (std::size_t k = 0; k < times.size(); ++k) {
            engine.advance_to(times[k]);
            seen[k][rep] = observe(engine);
        }
    });
    return seen;
}

// Pearson's chi-squared goodness of fit of observed counts against expected probabilities.
// Bins whose expected count is below `min_expected` are pooled (smallest first) into one
// bin until it reaches `min_expected`, the usual condition for the chi-squared
// approximation (Cochran 1954). `expected` may sum to less than 1: the remainder is a bin
// of its own ("anything else", e.g. the mass outside a truncated state space), whose
// observed count is `n - sum(observed)`.
struct ChiSquared {
    double statistic = 0.0;
    int dof = 0;
    double critical = 0.0;  // the (1 - alpha) quantile
    double p_value = 1.0;
    int bins = 0;
    bool passed() const { return statistic <= critical; }
    std::string describe() const {
        return "chi2 = " + std::to_string(statistic) + " on " + std::to_string(dof) +
               " dof, critical " + std::to_string(critical) + ", p = " + std::to_string(p_value);
    }
};

inline ChiSquared chi_squared_test(const std::vector<double>& expected_probability,
                                   const std::vector<std::uint64_t>& observed, std::uint64_t n,
                                   double alpha, double min_expected = 5.0) {
    struct Bin {
        double e;
        double o;
    };
    const double N = static_cast<double>(n);
    std::vector<Bin> bins;
    double p_sum = 0.0, o_sum = 0.0;
    for (std::size_t i = 0; i < expected_probability.size(); ++i) {
        const double p = std::max(0.0, expected_probability[i]);
        p_sum += p;
        o_sum += static_cast<double>(observed[i]);
        bins.push_back({p * N, static_cast<double>(observed[i])});
    }
    bins.push_back({std::max(0.0, 1.0 - p_sum) * N, N - o_sum});
    std::sort(bins.begin(), bins.end(), [](const Bin& a, const Bin& b) { return a.e < b.e; });
    Bin pool{0.0, 0.0};
    std::size_t first = 0;
    auto take = [&] {
        pool.e += bins[first].e;
        pool.o += bins[first].o;
        ++first;
    };
    while (first < bins.size() && bins[first].e < min_expected) take();
    // A pool still short of min_expected (or holding observations where none were
    // expected) takes the next smallest bins too.
    while (first < bins.size() && pool.e < min_expected && (pool.e > 0 || pool.o > 0)) take();
    ChiSquared r;
    auto add = [&](const Bin& b) {
        if (b.e <= 0) return;  // an empty pool (no sparse bins)
        r.statistic += (b.o - b.e) * (b.o - b.e) / b.e;
        ++r.bins;
    };
    add(pool);
    for (std::size_t i = first; i < bins.size(); ++i) add(bins[i]);
    r.dof = r.bins - 1;
    boost::math::chi_squared dist(r.dof);
    r.critical = boost::math::quantile(boost::math::complement(dist, alpha));
    r.p_value = boost::math::cdf(boost::math::complement(dist, r.statistic));
    return r;
}

}  // namespace tessera::validation
