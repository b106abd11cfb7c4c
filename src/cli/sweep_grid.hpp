// Loading every point of a sweep before anything runs: the --vary axes are parsed, and each
// point's scenario is loaded from the scenario file with the --set overrides and then the
// point's axis values as further overrides, so it meets exactly the checks of
// `tessera check SCENARIO --set ... --set KEY=VALUE`. Every problem is printed (a bad axis
// value names the key and the value); the caller exits with code 2.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/scenario.hpp"
#include "study/parameter_grid.hpp"

namespace tessera::cli {

struct LoadedGrid {
    ParameterGrid grid;
    std::vector<Scenario> scenarios;  // one per point, in point order (seeds as loaded)
    std::uint64_t checksum = 0;       // FNV-1a over their resolved scenarios, in point order
};

std::optional<LoadedGrid> load_grid(const std::string& scenario_file, const std::vector<std::string>& sets,
                                    const std::vector<std::string>& vary);

}  // namespace tessera::cli
