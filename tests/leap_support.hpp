// Shared pieces of the leap engine's tests: one-patch runs with either engine behind one
// interface, and sample moments with their standard errors.
#pragma once

#include <cmath>
#include <cstdint>
#include <numeric>
#include <vector>

#include "core/exact_patch.hpp"
#include "core/leap_patch.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/trait_grid.hpp"

namespace tessera::leaptest {

// One replicate of a one-patch system, advanced with LeapPatch or ExactPatch. It owns the
// stream (seed, replicate, patch 0) and counts its own steps, so results do not depend on
// which thread runs it.
template <class Patch>
struct OnePatch {
    std::vector<std::int64_t> active, dormant;
    PatchConditions where;
    EventCounts counts;
    std::uint64_t seed;
    std::uint32_t replicate;
    std::uint64_t step = 0;
    Patch patch;

    template <class... Extra>
    OnePatch(const TraitGrid& g, const RateTable& r, double K, PatchConditions w, std::uint64_t s,
             std::uint32_t rep, Extra... extra)
        : active(static_cast<std::size_t>(g.size()), 0), dormant(active.size(), 0), where(w), seed(s),
          replicate(rep), patch(g, r, K, extra...) {}

    void advance(double duration) {
        Rng rng(StreamKey{seed, replicate, 0}, step++, Phase::local);
        patch.advance(active.data(), dormant.data(), where, duration, rng, counts);
    }
    std::int64_t total() const {
        return std::accumulate(active.begin(), active.end(), std::int64_t{0}) +
               std::accumulate(dormant.begin(), dormant.end(), std::int64_t{0});
    }
};

// Sample mean and variance of a column, with standard errors: of the mean s / sqrt(N), of the
// variance sqrt((m4 - s^4 (N - 3)/(N - 1)) / N) from the sample fourth central moment
// (e.g. Kendall & Stuart, The Advanced Theory of Statistics, vol. 1, 10.5; from memory).
struct Moments {
    double mean = 0, variance = 0, se_mean = 0, se_variance = 0;
};

inline Moments moments(const std::vector<double>& v) {
    Moments m;
    const double n = static_cast<double>(v.size());
    for (double x : v) m.mean += x;
    m.mean /= n;
    double m2 = 0, m4 = 0;
    for (double x : v) {
        const double d = (x - m.mean) * (x - m.mean);
        m2 += d;
        m4 += d * d;
    }
    m.variance = m2 / (n - 1);
    m4 /= n;
    m.se_mean = std::sqrt(m.variance / n);
    m.se_variance = std::sqrt(std::max(0.0, m4 - m.variance * m.variance * (n - 3) / (n - 1)) / n);
    return m;
}

}  // namespace tessera::leaptest
