// The CSV time series. Traits in the fixed order (dormancy level major, transfer level
// minor); numbers in the shortest text that reads back to the same double.
//
// series.csv: one row per output time per trait, lattice totals:
//   replicate,t,t_logK,dormancy,transfer,active,dormant,exponent,exponent_per_patch
// with exponent = log(1 + active + dormant) / log(K) and exponent_per_patch =
// log(1 + (active + dormant) / P) / log(K), P the capacity-weighted number of habitable
// patches (the sum of the capacities of the scenario's habitat classes over the patches;
// 1 = at carrying capacity everywhere).
// habitat_series.csv: the same per habitat class (classes in scenario order), P taken over
// the class's patches:
//   replicate,t,t_logK,habitat,dormancy,transfer,active,dormant,exponent_per_patch
//
// A run writes integer counts; the deterministic model in counts (ode_series.csv,
// ode_habitat_series.csv) writes the same rows with real counts.
#pragma once

#include <ostream>
#include <string>
#include <vector>

#include "core/engine.hpp"

namespace tessera {

// The header line, with its newline.
std::string series_header();

// Appends the rows of the engine's current state to `out`.
void append_series_rows(const Engine& engine, std::string& out);

std::string habitat_series_header();
void append_habitat_series_rows(const Engine& engine, std::string& out);

// Real counts at one time: `active` and `dormant` laid out [patch][trait] as the Lattice.
struct RealCounts {
    const Scenario& scenario;  // complete: habitats and a map of width * height
    const TraitGrid& traits;
    std::uint32_t replicate;
    double t, t_logK;
    const std::vector<double>& active;
    const std::vector<double>& dormant;
};
void append_series_rows(const RealCounts& counts, std::string& out);
void append_habitat_series_rows(const RealCounts& counts, std::string& out);

// P of exponent_per_patch: the capacities of the patches of `habitat_class` (< 0: of every
// patch) summed, walls counting 0.
double habitable_patches(const Scenario& scenario, int habitat_class);

}  // namespace tessera
