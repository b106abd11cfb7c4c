// The CSV time series. Traits in the fixed order (dormancy level major, transfer level
// minor); numbers in the shortest text that reads back to the same double.
//
// series.csv: one row per output time per trait, lattice totals:
//   replicate,t,t_logK,dormancy,transfer,active,dormant,exponent
// with exponent = log(1 + active + dormant) / log(K).
// habitat_series.csv: the same per habitat class (classes in scenario order):
//   replicate,t,t_logK,habitat,dormancy,transfer,active,dormant
#pragma once

#include <ostream>
#include <string>

#include "core/engine.hpp"

namespace tessera {

// The header line, with its newline.
std::string series_header();

// Appends the rows of the engine's current state to `out`.
void append_series_rows(const Engine& engine, std::string& out);

std::string habitat_series_header();
void append_habitat_series_rows(const Engine& engine, std::string& out);

}  // namespace tessera
