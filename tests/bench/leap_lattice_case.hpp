// The lattice case of the leap benchmark and its callgrind driver (so the same case is timed
// and profiled): the default scenario (default rates, migration 0.05, sync 0.01) on a
// side x side lattice, every patch inoculated with K cells of trait (0,0), method "auto".
#pragma once

#include <cstddef>

#include "bench_case.hpp"
#include "core/scenario.hpp"

namespace tessera::bench {

inline Scenario lattice_scenario(int side, double K) {
    Scenario s = Case::make_scenario(K, 3);
    s.width = s.height = side;
    s.habitats = {Habitat{}};
    s.habitat_of_patch.assign(static_cast<std::size_t>(side) * side, 0);
    s.inocula.front().where = Inoculum::Where::all;
    s.time_unit = TimeUnit::plain;
    return s;
}

// Plain time run before timing: the inoculum has grown to the capacity and the first
// mutants and conjugations are under way (the costly transient of docs/performance.md).
constexpr double lattice_burn_in = 2.0;

}  // namespace tessera::bench
