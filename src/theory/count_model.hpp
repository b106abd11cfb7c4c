// The deterministic model in counts (docs/model.md, "The deterministic model in counts"):
// model.md section 5 on every patch at the scenario's own K, with migration, habitat
// conditions and their schedules, and mutation kept as a source term (core/deterministic_ode.hpp
// with MutationTerm::source). Counts are K times densities; a patch's capacity enters
// through c. It reproduces what a finite-K run does on average (Kurtz 1970, J. Appl. Probab.
// 7:49-58), including the slow approach to the K -> infinity exponent limit.
//
// Solved with Boost.Odeint's runge_kutta_dopri5 (Dormand & Prince 1980) with dense output:
// the conditions are constant between schedule switch times, so the integration restarts
// at each switch, and every output time inside a piece is read from the dense output.
// Output times are those of a run: every output.every and output.fields_every (in
// run.time_unit) from 0 to run.until, and run.until itself.
#pragma once

#include <functional>
#include <vector>

#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

// Numerical settings, each with its reason (docs/model.md).
struct CountModelSettings {
    // Relative error allowed per step in every count. Exponents are log(1 + N) / ln K, so a
    // relative error e moves an exponent by about e / ln K; 1e-9 per step keeps the
    // accumulated error of a long cycling run (thousands of steps) below 1e-5 in exponent.
    double relative_tolerance = 1e-9;
    // Absolute error allowed per step, in cells (divided by K for the densities). A count
    // far below one cell stands for a sub-population a run would have lost; above it every
    // count is followed to the relative tolerance, however small it is next to K.
    double absolute_cells = 1e-9;
    // First trial step, plain time (the controller adapts it at once).
    double first_step = 1e-3;
    // A step below this fraction of the current time means the integrator is stuck: the
    // model stops with an error naming the time instead of spinning.
    double smallest_relative_step = 1e-14;
};

// The state at one output time.
struct CountState {
    double t = 0.0;       // plain
    double t_logK = 0.0;  // t / ln K
    unsigned kinds = 0;   // series_output | fields_output (core/engine.hpp)
    // [patch][trait] counts (K times the densities), negative rounding residue set to 0.
    std::vector<double> active, dormant;
};

class CountModel {
public:
    explicit CountModel(const Scenario& scenario, CountModelSettings settings = {});

    const TraitGrid& traits() const { return grid_; }

    // Integrates from t = 0 (the inoculum, rounded to whole cells as a run rounds it) to run.until and
    // hands the state to `observe` at every output time, in time order. Throws
    // std::runtime_error naming the time when the integration fails (a count turns non-finite
    // or the step size collapses).
    void run(const std::function<void(const CountState&)>& observe) const;

    // Derivative evaluations of the last run (for the benchmark).
    std::size_t evaluations() const { return evaluations_; }

private:
    Scenario scenario_;
    TraitGrid grid_;
    CountModelSettings settings_;
    mutable std::size_t evaluations_ = 0;
};

}  // namespace tessera
