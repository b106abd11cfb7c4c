// The K -> infinity exponent limit (docs/performance.md, "Theory: the exponent limit"):
// predict_limit on one patch with 81 traits (9 x 9 levels on [0, 4] x [0, 4]) to t / ln K =
// 50, every mechanism on (dormancy p = 0.2, kappa = 0.05, frequency-dependent transfer
// tau = 1.5 with whole copies or transfer_only, mutation alpha = 0.5 with 10 % backward),
// from K cells of (0, 0). The target: well under a second.
//
//   build/tests/bench/bench_limit --benchmark_counters_tabular=true
//
// Counters: `phases` (resident phases), `knots` (breakpoints of the piecewise-affine
// exponents).
#include <benchmark/benchmark.h>

#include <cmath>

#include "theory/exponent_limit.hpp"

namespace {

using namespace tessera;

Scenario grid81(TransferCopies copies) {
    Scenario s;
    s.title = "81 traits";
    s.dormancy_axis = {4.0, 9};
    s.transfer_axis = {4.0, 9};
    s.rates.transfer = 1.5;
    s.rates.transfer_copies = copies;
    s.rates.dormancy_probability = 0.2;
    s.rates.dormant_death = 0.05;
    s.rates.mutation_exponent = 0.5;
    s.rates.mutation_backward = 0.1;
    s.K = 1e8;
    s.habitats = {Habitat{}};
    s.habitat_of_patch = {0};
    Inoculum in;
    in.exponent = 1.0;
    s.inocula = {in};
    s.until = 50.0;
    s.time_unit = TimeUnit::logK;
    return s;
}

void limit_81(benchmark::State& state, TransferCopies copies) {
    const Scenario s = grid81(copies);
    LimitPrediction p;
    for (auto _ : state) {
        p = predict_limit(s);
        benchmark::DoNotOptimize(p.knot_t_logK.data());
    }
    state.counters["phases"] = static_cast<double>(p.phases.size());
    state.counters["knots"] = static_cast<double>(p.knot_t_logK.size());
    if (!p.stop_reason.empty()) state.SetLabel(p.stop_reason);
}

BENCHMARK_CAPTURE(limit_81, whole, TransferCopies::whole)->Unit(benchmark::kMillisecond);
BENCHMARK_CAPTURE(limit_81, transfer_only, TransferCopies::transfer_only)->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();
