// Simulated time per second of the split lattice engine (docs/performance.md, "Lattice").
//
// The scenario defaults (src/core/scenario.hpp: 9 traits, default rates, migration 0.05,
// method "auto", sync 0.01) on a 128 x 128 lattice at K = 1e3, every patch inoculated with
// K cells of trait (0,0); 0.5 unit of plain time of burn-in, then each iteration runs 0.1
// unit. At K = 1e3 a patch holds about 80 events per step, so "auto" runs them exactly.
//
// Cases: 1 and 2 threads (tbb::global_control), with the default migration and with
// migration = 0 (the same patches, no migration phase at all). The targets: speed-up of
// 2 threads over 1 at least 1.8, and the cost with migration within 1.5x of without.
//
//   build-space/tests/bench/bench_lattice --benchmark_counters_tabular=true
//
// Counters: `time/s`, simulated plain time per wall second (real time: the threads' work);
// `cpu_s/unit`, process CPU seconds (all threads) per unit of simulated time.
#include <benchmark/benchmark.h>
#include <tbb/global_control.h>

#include <cstddef>
#include <ctime>

#include "core/engine.hpp"

namespace {

using namespace tessera;

constexpr int side = 128;
constexpr double K = 1e3;

Scenario lattice_scenario(double migration) {
    Scenario s;  // every rate at its default
    s.K = K;
    s.width = s.height = side;
    s.habitats = {Habitat{}};
    s.habitat_of_patch.assign(static_cast<std::size_t>(side) * side, 0);
    Inoculum in;  // "all", trait (0,0)
    in.exponent = 1.0;
    s.inocula = {in};
    s.rates.migration = migration;
    s.time_unit = TimeUnit::plain;
    return s;
}

void lattice(benchmark::State& state, int threads, bool migrate) {
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    const Scenario defaults;
    Engine engine(lattice_scenario(migrate ? defaults.rates.migration : 0.0));
    engine.advance_to(0.5);
    double simulated = 0;
    const std::clock_t cpu_start = std::clock();
    for (auto _ : state) {
        engine.advance_to(engine.time() + 0.1);
        simulated += 0.1;
    }
    const double cpu = static_cast<double>(std::clock() - cpu_start) / CLOCKS_PER_SEC;
    state.counters["time/s"] = benchmark::Counter(simulated, benchmark::Counter::kIsRate);
    // CPU seconds of all the process's threads per simulated unit: on a shared machine the
    // wall-clock speed-up is what others leave over, while this shows the parallel overhead
    // (equal values for 1 and 2 threads mean no work is added by going parallel).
    state.counters["cpu_s/unit"] = cpu / simulated;
    state.counters["events/unit"] = static_cast<double>(engine.totals().events()) / engine.time();
    state.counters["migrants/unit"] = static_cast<double>(engine.migrants()) / engine.time();
}

BENCHMARK_CAPTURE(lattice, threads1_migration, 1, true)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(5);
BENCHMARK_CAPTURE(lattice, threads1_no_migration, 1, false)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(5);
BENCHMARK_CAPTURE(lattice, threads2_migration, 2, true)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(5);
BENCHMARK_CAPTURE(lattice, threads2_no_migration, 2, false)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(5);

}  // namespace

BENCHMARK_MAIN();
