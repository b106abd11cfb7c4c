// scenario.resolved.toml: every setting as used, defaults filled in, plus the seed, the
// program version and the build id, so that a run can be repeated from its own output.
#pragma once

#include <string>

#include "core/scenario.hpp"

namespace tessera {

// The resolved scenario as TOML text that load_scenario reads back to an equal Scenario.
std::string resolved_scenario_toml(const Scenario& scenario);

}  // namespace tessera
