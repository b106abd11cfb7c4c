// The theory the viewer's live plot draws beside the simulation: the K -> infinity limit
// (dashed, when it applies) and, with `tessera view --predict ode`, the deterministic model
// in counts at this K (dotted). Both are computed once, before the window opens.
#pragma once

#include <optional>
#include <vector>

#include "core/scenario.hpp"
#include "render/sim_worker.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

// The limit when it applies to the scenario (one patch, ...); nothing when it does not or
// cannot be computed (the window still runs; the reason is printed).
std::optional<LimitPrediction> limit_for(const Scenario& scenario);

// The deterministic model as the live plot's history (normalised exponents of the lattice
// totals at every output time); empty when it fails (the reason is printed).
std::vector<TraitHistoryPoint> ode_for(const Scenario& scenario);

}  // namespace tessera
