// Events per second of the exact one-patch engine (ExactPatch::advance, Gillespie's direct
// method), on the default scenario of src/core/scenario.hpp at K = 1e4 and 1e5, and on an
// 81-trait grid (9 levels per axis) at K = 1e4, whose per-event cost should be close to the
// 9-trait one (the engine is O(x_levels + y_levels) per event).
//
// Each case starts from the scenario's inoculum (K cells of trait (0,0) in one patch) and
// runs a burn-in first (bench_case.hpp), so that the timed part sees the long-run mix of
// events rather than the initial growth. Each timed iteration runs the patch for one unit of
// plain time with a fresh Rng stream, as the engine's local phase does.
//
//   build-perf/tests/bench/bench_exact_patch --benchmark_counters_tabular=true
//
// Counters: `events/s` (events of the timed part over its wall time), `s/event` (its
// inverse), and the state after the run (active and dormant cells, resident trait index).
#include <benchmark/benchmark.h>

#include "bench_case.hpp"

namespace {

using tessera::bench::Case;

void exact_patch_events(benchmark::State& state, double K, int levels) {
    Case c(K, levels);
    c.run(Case::burn_in);
    std::uint64_t events = 0;
    for (auto _ : state) {
        events += c.run(1.0);
    }
    const auto n = static_cast<double>(events);
    state.counters["events/s"] = benchmark::Counter(n, benchmark::Counter::kIsRate);
    state.counters["s/event"] =
        benchmark::Counter(n, benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
    state.counters["active"] = static_cast<double>(c.active_total());
    state.counters["dormant"] = static_cast<double>(c.dormant_total());
    state.counters["resident"] = c.resident();
    state.counters["traits"] = c.grid.size();
}

BENCHMARK_CAPTURE(exact_patch_events, default_9traits_K1e4, 1e4, 3)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(exact_patch_events, default_9traits_K1e5, 1e5, 3)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(exact_patch_events, grid_81traits_K1e4, 1e4, 9)->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();
