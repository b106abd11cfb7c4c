// The benchmark cases of the exact one-patch engine, shared by the Google Benchmark
// executable and the callgrind driver (so the same case is timed and profiled).
#pragma once

#include <cstdint>
#include <vector>

#include "core/event_counts.hpp"
#include "core/exact_patch.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera::bench {

// The scenario defaults, one patch, inoculated with K^1 cells of trait (0,0); `levels`
// levels per axis on [0, 4] x [0, 4] (3 is the default 9-trait grid).
struct Case {
    Scenario scenario;
    TraitGrid grid;
    RateTable rates;
    ExactPatch patch;
    std::vector<std::int64_t> active, dormant;
    PatchConditions where;
    EventCounts counts;
    std::uint64_t step = 0;

    static Scenario make_scenario(double K, int levels) {
        Scenario s;
        s.K = K;
        s.dormancy_axis = {4.0, levels};
        s.transfer_axis = {4.0, levels};
        Inoculum in;
        in.where = Inoculum::Where::patch;
        in.exponent = 1.0;
        s.inocula.push_back(in);
        return s;
    }

    Case(double K, int levels)
        : scenario(make_scenario(K, levels)),
          grid(scenario.dormancy_axis, scenario.transfer_axis),
          rates(grid, scenario.rates, K),
          patch(grid, rates, K),
          active(grid.size(), 0),
          dormant(grid.size(), 0) {
        active[*grid.find(0.0, 0.0)] = static_cast<std::int64_t>(K);
    }

    // Burn-in: 40 time units (about 4.3 ln K at K = 1e4) take the default scenario from the
    // (0,0) inoculum through the mutants' invasions to the (0,4)-dominated mix.
    static constexpr double burn_in = 40.0;

    // Runs `duration` units of plain time as successive one-unit steps; returns the events.
    std::uint64_t run(double duration) {
        std::uint64_t events = 0;
        for (double t = 0; t < duration; t += 1.0) {
            Rng rng(StreamKey{1, 0, 0}, step++, Phase::local);
            events += patch.advance(active.data(), dormant.data(), where, 1.0, rng, counts);
        }
        return events;
    }
    std::int64_t active_total() const {
        std::int64_t n = 0;
        for (auto a : active) n += a;
        return n;
    }
    std::int64_t dormant_total() const {
        std::int64_t n = 0;
        for (auto d : dormant) n += d;
        return n;
    }
    // The trait with the most active cells (the resident).
    int resident() const {
        int best = 0;
        for (int i = 1; i < static_cast<int>(active.size()); ++i) {
            if (active[i] > active[best]) best = i;
        }
        return best;
    }
};

}  // namespace tessera::bench
