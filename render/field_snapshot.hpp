// What a picture of the lattice needs, copied out of a running Engine or read back from
// fields.h5: counts per patch and trait, the habitat map, the class conditions in force,
// and the time. Pictures are made from this copy only, so drawing never touches (or waits
// for) the engine, and a recorded frame and a re-rendered one come from the same data.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "core/engine.hpp"
#include "core/patch_conditions.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

struct FieldSnapshot {
    Scenario scenario;  // settings as used (habitats, trait axes, K, method, stress schedule)
    TraitGrid grid{TraitAxis{0.0, 1}, TraitAxis{0.0, 1}};
    int width = 0;
    int height = 0;
    double t = 0.0;       // plain time
    double t_logK = 0.0;  // t / ln K
    std::vector<std::int64_t> active;   // [patch][trait], patches row by row, top row first
    std::vector<std::int64_t> dormant;  // same layout
    std::vector<PatchConditions> conditions;  // per habitat class, in force at t

    int traits() const { return grid.size(); }
    std::size_t patches() const { return static_cast<std::size_t>(width) * height; }
    const std::int64_t* active_at(std::size_t patch) const { return active.data() + patch * traits(); }
    const std::int64_t* dormant_at(std::size_t patch) const { return dormant.data() + patch * traits(); }
    const PatchConditions& conditions_of(std::size_t patch) const {
        return conditions[scenario.habitat_of_patch[patch]];
    }
    // The largest stress any class reaches, at any time (base or scheduled): the top of the
    // stress colour scale, fixed for the whole run so frames compare.
    double stress_scale() const;
};

// An empty snapshot for `scenario` (habitat map and conditions at t filled in, no cells).
// The scenario must be complete (habitats non-empty, map of width*height).
FieldSnapshot make_snapshot(const Scenario& scenario, double t);

// A copy of the engine's state now.
FieldSnapshot snapshot_of(const Engine& engine);

// Copies the engine's counts and time into `into` (which came from snapshot_of for the same
// engine), reusing its buffers: what the viewer does at every output time.
void update_snapshot(FieldSnapshot& into, const Engine& engine);

}  // namespace tessera
