// Settling the deterministic limit (model.md section 5, mutation off) to a stable
// equilibrium: the residents of a phase of the exponent limit. Integrated with Boost.Odeint's
// runge_kutta_dopri5 (Dormand & Prince 1980), step size controlled.
#pragma once

#include <vector>

#include "core/deterministic_ode.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

struct SettleResult {
    bool converged = false;
    std::vector<double> densities;  // units of K; compartments at or below extinct_density set to 0
    double time = 0.0;              // plain time integrated
    double residual = 0.0;          // largest |d density / dt| among the compartments kept
};

// Integrates `ode` (one patch) from `start` until no compartment above extinct_density
// changes faster than settle_tolerance, or settle_time_max has passed (converged = false).
// Then compartments at or below extinct_density are set to 0 and the rest settles again, so
// the equilibrium is that of the residents alone.
SettleResult settle(const DeterministicOde& ode, std::vector<double> start, const LimitSettings& settings);

// The largest |dy/dt| over compartments above `floor`.
double settle_residual(const DeterministicOde& ode, const std::vector<double>& y, double floor);

}  // namespace tessera
