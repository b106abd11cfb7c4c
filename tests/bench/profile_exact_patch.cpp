// A driver for instruction counts of the exact one-patch engine under callgrind, which are
// repeatable where wall times on a shared machine are not:
//
//   valgrind --tool=callgrind --instr-atstart=no build-perf/tests/bench/profile_exact_patch [K] [levels] [time]
//
// Runs the benchmark case (bench_case.hpp) through its burn-in uninstrumented, then
// `time` units of plain time (default 10) with instrumentation on, and prints the events
// of that part; Ir / events is the instruction count per event. Without valgrind it just
// runs (the client requests are no-ops).
#include <cstdio>

#include "bench_case.hpp"
#include "profile_support.hpp"

int main(int argc, char** argv) {
    using tessera::bench::int_argument, tessera::bench::number_argument;
    const double K = number_argument(argc, argv, 1, 1e4);
    const int levels = int_argument(argc, argv, 2, 3);
    const double time = number_argument(argc, argv, 3, 10.0);
    tessera::bench::Case c(K, levels);
    c.run(tessera::bench::Case::burn_in);
    CALLGRIND_START_INSTRUMENTATION;
    const auto events = c.run(time);
    CALLGRIND_STOP_INSTRUMENTATION;
    std::printf("K=%g traits=%d time=%g events=%llu active=%lld dormant=%lld resident=%d\n", K,
                c.grid.size(), time, static_cast<unsigned long long>(events),
                static_cast<long long>(c.active_total()), static_cast<long long>(c.dormant_total()),
                c.resident());
    return 0;
}
