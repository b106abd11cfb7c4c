// The exponent limit's files (docs/formats.md "Outputs of predict --model limit"). Traits in
// the fixed order (dormancy level major, transfer level minor); trait levels in the shortest
// text that reads back, times and densities with 12 significant digits, exponents with 10 (the limit
// is exact up to the rounding of its event arithmetic; densities come from an integration
// to a tolerance far coarser than that).
//
// limit_series.csv: t_logK,dormancy,transfer,exponent
//   at every output.every (in t / ln K) from 0 to run.until, and at run.until; rows only up to
//   the prediction's stopped_at.
// limit_phases.csv: phase,start_t_logK,end_t_logK,end,dormancy,transfer,active_density,dormant_density
//   one row per resident trait per phase (phases numbered from 0); a phase without residents
//   has one row with the trait and density fields empty.
#pragma once

#include <string>

#include "core/trait_grid.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

std::string limit_series_header();
// Rows at t / ln K = j * every (every > 0) up to `until`, and at `until` itself.
std::string limit_series_rows(const LimitPrediction& prediction, const TraitGrid& traits, double every,
                              double until);

std::string limit_phases_header();
std::string limit_phases_rows(const LimitPrediction& prediction, const TraitGrid& traits);

}  // namespace tessera
