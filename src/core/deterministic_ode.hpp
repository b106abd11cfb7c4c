// The deterministic limit of model.md section 5 (docs/model.md writes it out): densities
// a_i = A_i / K and z_i = D_i / K per patch, with dormancy, conjugation in both forms and
// both copy modes, per-trait rate overrides, and migration with walls, reflecting, periodic
// or absorbing edges and permeability. Mutation is left out: its probability K^-alpha
// vanishes in the limit (Kurtz 1970, J. Appl. Probab. 7:49-58, is the law of large numbers
// this ODE is the limit of).
//
// Plain std::vector state, so any integrator can use it: the call operator has the
// signature Boost.Odeint expects of a system, (const state&, state&, time). The core does
// not depend on Boost; the tests integrate it with runge_kutta_dopri5.
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#include "core/neighbourhood.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

class DeterministicOde {
public:
    // `where` holds the conditions of every patch (row-major, as the Lattice); a patch of
    // capacity 0 is a wall. Migration rates, neighbourhood and boundary come from `scenario`.
    DeterministicOde(const Scenario& scenario, const TraitGrid& grid, const RateTable& rates,
                     std::vector<PatchConditions> where);

    // State layout: [patch][a_0 .. a_{T-1}, z_0 .. z_{T-1}].
    std::size_t size() const { return where_.size() * 2 * static_cast<std::size_t>(T_); }
    std::size_t active_index(std::size_t patch, int trait) const { return patch * 2 * T_ + trait; }
    std::size_t dormant_index(std::size_t patch, int trait) const { return patch * 2 * T_ + T_ + trait; }

    // dy/dt at y (time does not enter: schedules are not modelled here).
    void operator()(const std::vector<double>& y, std::vector<double>& dydt, double t) const;

private:
    void local(const double* a, const double* z, const PatchConditions& c, double* da, double* dz) const;

    const TraitGrid& grid_;
    const RateTable& rates_;
    std::vector<PatchConditions> where_;
    Neighbourhood neighbourhood_;
    int width_;
    int T_;
    Boundary boundary_;
    double migration_, migration_dormant_;
    mutable std::vector<double> level_;  // work space: active density per transfer level
};

}  // namespace tessera
