// The deterministic model in counts on a 64 x 64 lattice (docs/performance.md, "Theory: the
// deterministic model in counts"): 9 traits, every mechanism on (dormancy, conjugation,
// mutation as a source, migration), a stressed disc with a repeating stress pulse, to t = 100
// (plain), series rows formatted every 1 and field snapshots copied every 10 as `tessera
// predict --model ode` does (the files themselves are left out: disk speed is not ours).
// Prints wall time, derivative evaluations and steps for 1 and 2 threads, and checks that
// both gave the same bits. Target: under 30 s on 2 cores.
//
//   build/tests/bench/bench_count_model [--rtol R] [threads...]     (default: 1 2)
#include <tbb/global_control.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "io/series_writer.hpp"
#include "theory/count_model.hpp"

using namespace tessera;

namespace {

Scenario lattice() {
    Scenario s;
    s.title = "count model benchmark";
    s.K = 1e6;
    s.width = 64;
    s.height = 64;
    s.rates.migration = 0.05;
    s.rates.migration_dormant = 0.01;
    const Habitat open{}, stressed{"stressed", "s", "#c04040", 1.0, 1.5, 0.5, 1.0};
    s.habitats = {open, stressed};
    s.habitat_of_patch.assign(64 * 64, 0);
    for (int row = 0; row < 64; ++row) {
        for (int col = 0; col < 64; ++col) {
            if (std::hypot(col - 40.0, row - 24.0) < 14.0) s.habitat_of_patch[static_cast<std::size_t>(row) * 64 + col] = 1;
        }
    }
    Inoculum resident;
    resident.exponent = 1.0;
    Inoculum corner;
    corner.where = Inoculum::Where::rect;
    corner.x0 = 0, corner.y0 = 56, corner.x1 = 7, corner.y1 = 63;
    corner.dormancy = 4.0;
    corner.transfer = 4.0;
    corner.active = 1e3;
    s.inocula = {resident, corner};
    Schedule pulse;
    pulse.habitat = "stressed";
    pulse.start = 10.0;
    pulse.end = 12.0;
    pulse.every = 24.0;
    pulse.stress = 4.0;
    s.schedules = {pulse};
    s.time_unit = TimeUnit::plain;
    s.until = 100.0;
    s.output_every = 1.0;
    s.fields_every = 10.0;
    return s;
}

}  // namespace

int main(int argc, char** argv) {
    std::vector<int> threads;
    CountModelSettings settings;
    for (int k = 1; k < argc; ++k) {
        const std::string a = argv[k];
        if (a == "--rtol" && k + 1 < argc) {
            settings.relative_tolerance = std::atof(argv[++k]);
        } else {
            threads.push_back(std::atoi(argv[k]));
        }
    }
    if (threads.empty()) threads = {1, 2};
    const Scenario s = lattice();
    std::vector<double> first;
    for (int n : threads) {
        tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(n));
        const CountModel model(s, settings);
        std::string rows;
        std::size_t snapshots = 0;
        std::vector<double> final_active;
        const auto start = std::chrono::steady_clock::now();
        model.run([&](const CountState& now) {
            if (now.kinds & series_output) {
                rows.clear();
                append_series_rows(RealCounts{s, model.traits(), 0, now.t, now.t_logK, now.active, now.dormant}, rows);
                append_habitat_series_rows(RealCounts{s, model.traits(), 0, now.t, now.t_logK, now.active, now.dormant},
                                           rows);
            }
            if (now.kinds & fields_output) ++snapshots;
            final_active = now.active;
        });
        const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        std::printf("threads %d: %.2f s, %zu derivative evaluations, %zu field snapshots\n", n, seconds,
                    model.evaluations(), snapshots);
        if (first.empty()) {
            first = final_active;
        } else if (final_active != first) {
            std::printf("error: the counts differ between thread counts\n");
            return 1;
        }
    }
    return 0;
}
