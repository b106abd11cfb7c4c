#include <tbb/info.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <vector>

#include "cli/commands.hpp"
#include "core/memory_estimate.hpp"
#include "core/trait_grid.hpp"
#include "io/machine_memory.hpp"
#include "cli/scenario_input.hpp"

namespace tessera::cli {

namespace {

// Exact simulation rate of this machine, events per second per core (docs/performance.md).
constexpr double events_per_core_second = 2e7;

}  // namespace

int check_command(const CheckOptions& o) {
    const auto loaded = load_or_report(o.scenario, o.sets);
    if (!loaded) return 2;
    Scenario s = *loaded;
    const TraitGrid traits(s.dormancy_axis, s.transfer_axis);
    const std::size_t patches = static_cast<std::size_t>(s.width) * s.height;

    std::printf("%s: ok\n", o.scenario.c_str());
    if (!s.title.empty()) std::printf("  title        %s\n", s.title.c_str());
    std::printf("  traits       %d (dormancy %d levels up to %g, transfer %d levels up to %g)\n", traits.size(),
                traits.x_levels(), traits.dormancy_max(), traits.y_levels(), traits.transfer_max());
    std::printf("  K            %g\n", s.K);
    std::printf("  lattice      %d x %d = %zu patches, %d-neighbourhood, %s boundary\n", s.width, s.height,
                patches, s.neighbourhood,
                name_of(s.boundary));
    std::vector<std::size_t> per_class(s.habitats.size(), 0);
    for (auto c : s.habitat_of_patch) ++per_class[c];
    std::printf("  habitats\n");
    double capacity_sum = 0;
    for (std::size_t c = 0; c < s.habitats.size(); ++c) {
        const Habitat& h = s.habitats[c];
        std::printf("    %-12s %8zu patches  capacity %g, stress %g%s\n", h.name.c_str(), per_class[c], h.capacity,
                    h.stress, h.capacity == 0 ? " (wall)" : "");
        capacity_sum += h.capacity * static_cast<double>(per_class[c]);
    }
    const double until_plain = s.to_plain(s.until);
    std::printf("  run          until %g %s (plain time %g), method %s, sync %g, seed %llu\n", s.until,
                s.time_unit == TimeUnit::logK ? "t/lnK" : "plain", until_plain, name_of(s.method), s.sync,
                static_cast<unsigned long long>(s.seed));

    // Rough cost: at the resident equilibrium every cell divides at about b_max and as many
    // die, plus conjugation at up to tau per cell.
    const Rates& r = s.rates;
    const double cells = s.K * capacity_sum * std::max(0.0, r.birth_max - r.death) / std::max(r.competition, 1e-9);
    const double events_per_time = cells * (2 * r.birth_max + r.transfer);
    const double cores = s.threads > 0 ? s.threads : tbb::info::default_concurrency();
    const double memory = lattice_memory_bytes(static_cast<double>(patches), traits.size(), s.neighbourhood);
    std::printf("  estimate     ~%.2g cells, ~%.2g events per unit time, memory ~%s\n", cells, events_per_time,
                bytes_text(memory).c_str());
    std::printf("               exact simulation ~%.2g s of wall time on %g cores (rough)\n",
                events_per_time * until_plain / (events_per_core_second * cores), cores);
    return 0;
}

}  // namespace tessera::cli
