// The deterministic model of model.md section 5 (docs/model.md writes it out): densities
// a_i = A_i / K and z_i = D_i / K per patch, with dormancy, conjugation in both forms and
// both copy modes, per-trait rate overrides, and migration with walls, reflecting, periodic
// or absorbing edges and permeability (Kurtz 1970, J. Appl. Probab. 7:49-58, is the law of
// large numbers this ODE is the limit of).
//
// Mutation is off by default: its probability K^-alpha vanishes as K -> infinity, so the
// limit has none. With MutationTerm::source it is kept as a source term at the scenario's
// own K (the deterministic model in counts, src/theory/count_model.hpp): a fraction mu of
// every division's offspring goes to the mutation targets of model.md section 2, forward
// or, with probability mutation_backward, backward; where a direction has no target the
// offspring keeps its parent's trait, as in the engines.
//
// Patch conditions are fixed between calls of set_conditions: a driver that follows
// schedules integrates piecewise between switch times. On large lattices the right-hand side
// runs in parallel over patches; each patch's derivative (its local terms, its outflow and
// the inflow it pulls from its neighbours) is computed by one task alone, in a fixed order,
// so the result does not depend on the number of threads.
//
// Plain std::vector state, so any integrator can use it: the call operator has the
// signature Boost.Odeint expects of a system, (const state&, state&, time). The core does
// not depend on Boost.
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

enum class MutationTerm { off, source };

class DeterministicOde {
public:
    // `where` holds the conditions of every patch (row-major, as the Lattice); a patch of
    // capacity 0 is a wall. Migration rates, neighbourhood and boundary come from `scenario`.
    // `grid` and `rates` must outlive the system.
    DeterministicOde(const Scenario& scenario, const TraitGrid& grid, const RateTable& rates,
                     std::vector<PatchConditions> where, MutationTerm mutation = MutationTerm::off);

    // State layout: [patch][a_0 .. a_{T-1}, z_0 .. z_{T-1}].
    std::size_t size() const { return where_.size() * 2 * static_cast<std::size_t>(T_); }
    std::size_t active_index(std::size_t patch, int trait) const { return patch * 2 * T_ + trait; }
    std::size_t dormant_index(std::size_t patch, int trait) const { return patch * 2 * T_ + T_ + trait; }

    // New conditions for every patch (a schedule switched); same size as before.
    void set_conditions(std::vector<PatchConditions> where);
    const std::vector<PatchConditions>& conditions() const { return where_; }

    // dy/dt at y under the current conditions (time does not enter).
    void operator()(const std::vector<double>& y, std::vector<double>& dydt, double t) const;

    // Lattices with at least this many patches get the parallel right-hand side: below it a
    // derivative costs a few microseconds, less than handing work to threads.
    static constexpr std::size_t parallel_min_patches = 256;

private:
    struct Work {
        std::vector<double> level, won;  // active density per transfer level; whole-copy gains
        std::vector<double> clipped;     // the patch's densities, clipped at 0
    };
    struct Inflow {
        std::uint32_t from;  // source patch
        std::uint8_t dir;    // its direction of jump
    };
    void patch_derivative(const std::vector<double>& y, std::size_t p, std::vector<double>& dydt, Work& w) const;
    void local(const double* a, const double* z, const PatchConditions& c, double* da, double* dz, Work& w) const;
    void migration(const std::vector<double>& y, std::size_t p, double* dydt_p) const;

    const TraitGrid& grid_;
    const RateTable& rates_;
    std::vector<PatchConditions> where_;
    Neighbourhood neighbourhood_;
    int width_;
    int T_;
    Boundary boundary_;
    double migration_, migration_dormant_;
    bool migrates_;  // more than one patch and a positive rate (the engine skips it otherwise)
    // Mutation as a source: per parent, (target, fraction of its births), and the fraction
    // that stays the parent's.
    struct Mutant {
        int target;
        double share;
    };
    std::vector<std::vector<Mutant>> mutants_;
    // Migration in pull form: the (source, direction) pairs whose jump lands on each patch,
    // in source-patch then direction order ([patch] offsets into inflow_).
    std::vector<std::size_t> inflow_start_;
    std::vector<Inflow> inflow_;
    // From the current conditions (refresh_migration): per patch and compartment, the rate
    // each cell leaves at (over every direction that passes) and the rate it sends towards
    // one neighbour (0 from a wall).
    void refresh_migration();
    std::vector<double> out_rate_, send_rate_;  // [patch][active, dormant]
    // Work space of one derivative: what each patch sends towards one neighbour, [patch][a, z]
    // as the state (so one object takes one derivative at a time).
    mutable std::vector<double> sent_;
    void fill_sent(const std::vector<double>& y, std::size_t p) const;
    std::vector<int> y_of_, x_of_;              // level of each trait on each axis
};

}  // namespace tessera
