// A driver for instruction counts of the leap engine's lattice case under callgrind, which
// are repeatable where wall times on a shared machine are not:
//
//   valgrind --tool=callgrind --instr-atstart=no build-leap2/tests/bench/profile_leap [side] [K] [time] [threads]
//
// Runs the lattice case (leap_lattice_case.hpp; default 8 x 8, K = 1e6) through its burn-in
// uninstrumented, then `time` units of plain time (default 0.05) with instrumentation on.
// Afterwards it replays one sync step of every patch from the final state through a fresh
// LeapPatch and prints what the leap engine did per patch and step (leaps, rejections,
// critical firings, exact events): the quantities that decide the cost.
#include <tbb/global_control.h>

#include <cstdio>
#include <vector>

#include "core/engine.hpp"
#include "core/leap_patch.hpp"
#include "leap_lattice_case.hpp"
#include "profile_support.hpp"

int main(int argc, char** argv) {
    using namespace tessera;
    const int side = bench::int_argument(argc, argv, 1, 8);
    const double K = bench::number_argument(argc, argv, 2, 1e6);
    const double time = bench::number_argument(argc, argv, 3, 0.05);
    const int threads = bench::int_argument(argc, argv, 4, 1);
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    const Scenario s = bench::lattice_scenario(side, K);
    Engine engine(s);
    engine.advance_to(bench::lattice_burn_in);
    CALLGRIND_START_INSTRUMENTATION;
    engine.advance_to(engine.time() + time);
    CALLGRIND_STOP_INSTRUMENTATION;

    const Lattice& lat = engine.lattice();
    const int T = engine.traits().size();
    LeapPatch leap(engine.traits(), engine.rates(), K);
    EventCounts counts;
    std::uint64_t events = 0;
    for (std::size_t p = 0; p < lat.patches(); ++p) {
        std::vector<std::int64_t> a(lat.active(p), lat.active(p) + T), d(lat.dormant(p), lat.dormant(p) + T);
        Rng rng(StreamKey{s.seed, 0, static_cast<std::uint32_t>(p)}, 1u << 30, Phase::local);
        events += leap.advance(a.data(), d.data(), engine.conditions(p), s.sync, rng, counts);
    }
    const double n = static_cast<double>(lat.patches());
    const LeapStats& st = leap.stats();
    std::printf("side=%d K=%g t=%g: per patch-step leaps %.2f rejected %.3f critical %.2f exact stretches %.2f "
                "exact events %.1f events %.0f\n",
                side, K, engine.time(), st.leaps / n, st.rejected / n, st.critical_events / n,
                st.exact_stretches / n, st.exact_events / n, static_cast<double>(events) / n);
    std::printf("patch 0:");
    for (int i = 0; i < T; ++i) std::printf(" %lld/%lld", static_cast<long long>(lat.active(0)[i]),
                                            static_cast<long long>(lat.dormant(0)[i]));
    std::printf("\n");
    return 0;
}
