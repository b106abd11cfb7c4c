// Where the [[inoculum]] tables put cells: one call per (patch, inoculum) with the trait and
// the active and dormant counts as written (before a run rounds them to whole cells). The
// one reading of the inoculum rules, shared by the Engine (integer counts) and the
// deterministic model in counts (src/theory/count_model.hpp, real counts).
#pragma once

#include <cstddef>
#include <functional>
#include <vector>

#include "core/patch_conditions.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

// `scenario` complete (habitats, a map of width * height); `classes` the conditions of each
// habitat class at t = 0 (walls, capacity 0, get nothing; exponent inocula use K_p).
void for_each_inoculum_cell(const Scenario& scenario, const TraitGrid& traits, const std::vector<PatchConditions>& classes,
                            const std::function<void(std::size_t patch, int trait, double active, double dormant)>& put);

}  // namespace tessera
