// Simulated time per second of the leap engine (docs/performance.md, "Large populations").
//
//  * one patch, the default 9-trait scenario (src/core/scenario.hpp), K = 1e3 .. 1e12,
//    LeapPatch driven in steps of the default sync (0.01), as the engine's local phase does;
//    after a burn-in of 40 time units from K cells of trait (0,0) (bench_case.hpp), so that
//    the timed part sees the long-run mix of traits. One iteration is one unit of plain time.
//    The exact engine at K = 1e3 and 1e4 is there for comparison.
//  * the default scenario on a 64 x 64 lattice at K = 1e6, every patch inoculated with K
//    cells of (0,0), method "auto" (the Engine: leap, exact, migration), 2 threads: the
//    first 10 units of plain time as a whole, the conjugation wave (t = 1 .. 2) and the
//    state after it (t = 10 .. 15), each timed once from a fresh inoculation.
//
//   build-leap/tests/bench/bench_leap --benchmark_counters_tabular=true
//
// Counters: `time/s` (simulated plain time per wall second), `leaps/unit` and
// `exact/unit` (exact events per unit time inside the leap engine).
#include <benchmark/benchmark.h>
#include <tbb/global_control.h>

#include "bench_case.hpp"
#include "leap_lattice_case.hpp"
#include "core/engine.hpp"
#include "core/leap_patch.hpp"

namespace {

using tessera::bench::Case;
using namespace tessera;

void leap_one_patch(benchmark::State& state, double K) {
    Case c(K, 3);
    LeapPatch leap(c.grid, c.rates, K);
    std::uint64_t step = 0;
    auto run = [&](double duration) {
        const int steps = static_cast<int>(duration / c.scenario.sync + 0.5);
        for (int k = 0; k < steps; ++k) {
            Rng rng(StreamKey{1, 0, 0}, step++, Phase::local);
            leap.advance(c.active.data(), c.dormant.data(), c.where, c.scenario.sync, rng, c.counts);
        }
    };
    run(Case::burn_in);
    leap.reset_stats();
    double simulated = 0;
    for (auto _ : state) {
        run(1.0);
        simulated += 1.0;
    }
    state.counters["time/s"] = benchmark::Counter(simulated, benchmark::Counter::kIsRate);
    state.counters["leaps/unit"] = static_cast<double>(leap.stats().leaps) / simulated;
    state.counters["exact/unit"] = static_cast<double>(leap.stats().exact_events) / simulated;
    state.counters["rejected"] = static_cast<double>(leap.stats().rejected);
    state.counters["active"] = static_cast<double>(c.active_total());
    state.counters["resident"] = c.resident();
}

void exact_one_patch(benchmark::State& state, double K) {
    Case c(K, 3);
    c.run(Case::burn_in);
    double simulated = 0;
    for (auto _ : state) {
        c.run(1.0);
        simulated += 1.0;
    }
    state.counters["time/s"] = benchmark::Counter(simulated, benchmark::Counter::kIsRate);
    state.counters["active"] = static_cast<double>(c.active_total());
}

// One timed stretch [from, to) of plain time of the lattice case, from a fresh inoculation;
// the run up to `from` is not timed. Single iteration: the state cannot be repeated.
void lattice_auto(benchmark::State& state, int side, double K, double from, double to) {
    tbb::global_control threads(tbb::global_control::max_allowed_parallelism, 2);
    for (auto _ : state) {
        state.PauseTiming();
        Engine engine(tessera::bench::lattice_scenario(side, K));
        engine.advance_to(from);
        state.ResumeTiming();
        engine.advance_to(to);
    }
    state.counters["time/s"] = benchmark::Counter((to - from) * static_cast<double>(state.iterations()),
                                                  benchmark::Counter::kIsRate);
    state.counters["patches"] = static_cast<double>(side) * side;
}

BENCHMARK_CAPTURE(leap_one_patch, K1e3, 1e3)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(leap_one_patch, K1e4, 1e4)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(leap_one_patch, K1e6, 1e6)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(leap_one_patch, K1e9, 1e9)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(leap_one_patch, K1e12, 1e12)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(exact_one_patch, K1e3, 1e3)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(exact_one_patch, K1e4, 1e4)->Unit(benchmark::kMillisecond);
// The whole first 10 units; the conjugation wave alone (t = 1 .. 2, the costliest stretch);
// the state after it (t = 10 .. 15).
BENCHMARK_CAPTURE(lattice_auto, 64x64_K1e6_t0_10, 64, 1e6, 0.0, 10.0)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK_CAPTURE(lattice_auto, 64x64_K1e6_t1_2, 64, 1e6, 1.0, 2.0)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK_CAPTURE(lattice_auto, 64x64_K1e6_t10_15, 64, 1e6, 10.0, 15.0)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);

}  // namespace

BENCHMARK_MAIN();
