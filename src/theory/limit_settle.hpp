// Settling the deterministic limit (model.md section 5, mutation off) to a stable
// equilibrium: the residents of a phase of the exponent limit. Integrated with Boost.Odeint's
// runge_kutta_dopri5 (Dormand & Prince 1980), step size controlled.
#pragma once

#include <cstddef>
#include <vector>

#include "core/deterministic_ode.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

struct SettleResult {
    bool converged = false;
    std::vector<double> densities;  // units of K; compartments at or below extinct_density set to 0
    double time = 0.0;              // plain time integrated
    double residual = 0.0;          // largest |d density / dt| among the compartments kept
    bool unbounded = false;         // stopped because a density passed density_max
    bool out_of_steps = false;      // stopped after settle_steps_max integration steps
    std::size_t steps = 0;
};

// Integrates `ode` (one patch) from `start` until no compartment above extinct_density
// changes faster than settle_tolerance, or settle_time_max has passed (converged = false).
// Then compartments at or below extinct_density are set to 0 and the rest settles again, so
// the equilibrium is that of the residents alone.
SettleResult settle(const DeterministicOde& ode, std::vector<double> start, const LimitSettings& settings);

// Below exponent 1 (no resident) competition and dormancy induction vanish and the system is
// homogeneous of degree one (growth, resuscitation, frequency-dependent transfer tau A A' / N):
// the dominant compartments approach a stable direction and grow along it at one rate.
struct RayResult {
    bool converged = false;
    std::vector<double> direction;  // summing to 1; fractions at or below extinct_density set to 0
    double growth = 0.0;            // per unit plain time
    double time = 0.0;
    std::size_t steps = 0;
};
// Integrates `ode` (conditions without competition, LimitModel::ode_below_one) from `start`,
// renormalising, until no compartment's share changes faster than polish_from relative to
// itself, or settle_time_max has passed.
RayResult settle_ray(const DeterministicOde& ode, std::vector<double> start, const LimitSettings& settings);

// The largest |dy/dt| over compartments above `floor`.
double settle_residual(const DeterministicOde& ode, const std::vector<double>& y, double floor);

}  // namespace tessera
