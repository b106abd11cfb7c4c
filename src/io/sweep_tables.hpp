// The tables of a sweep (docs/formats.md "Sweeps"): header lines and rows as text, one row
// per item, numbers in the shortest text that reads back to the same double (times with 12
// significant digits, as series.csv). The caller writes them; nothing here touches files.
//
//   points.csv          point,<one column per varied key, named as given to --vary>
//   outcomes.csv        point,source,replicate,regime,residents,period,final_t_logK
//   final_exponents.csv point,source,replicate,dormancy,transfer,exponent
//   summary.csv         point,source,replicates,kind,name,fraction,wilson_low,wilson_high
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "core/trait_grid.hpp"
#include "study/parameter_grid.hpp"
#include "study/regime.hpp"
#include "study/sweep_point.hpp"

namespace tessera {

std::string points_header(const ParameterGrid& grid);
std::string points_row(const ParameterGrid& grid, std::size_t point);

std::string outcomes_header();
// `source` is "limit" or "run"; limit rows have replicate 0.
void append_outcome_row(std::string& out, std::size_t point, const char* source, int replicate, const Outcome& outcome,
                        const std::vector<std::string>& trait_names);

std::string final_exponents_header();
void append_final_exponent_rows(std::string& out, std::size_t point, const char* source, int replicate,
                                const std::vector<double>& exponents, const TraitGrid& traits);

std::string summary_header();
void append_summary_rows(std::string& out, std::size_t point, const char* source, const std::vector<SummaryRow>& rows);

// A CSV value: quoted (with "" for ") when it holds a comma, a quote or a newline.
std::string csv_field(const std::string& text);

}  // namespace tessera
