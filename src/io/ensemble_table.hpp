// ensemble.csv (docs/formats.md): statistics over the replicates of a finished
// `tessera run --replicates R`, computed from its series.csv. One row per output time and
// trait, in the order of series.csv:
//   t,t_logK,dormancy,transfer,replicates,present,
//   exponent_{mean,median,q10,q90},exponent_per_patch_{mean,median,q10,q90},count_{mean,median,q10,q90}
// count = active + dormant; present = fraction of replicates with count > 0; quantiles of
// Hyndman & Fan type 7 (study/ensemble_statistics.hpp); exponent_per_patch =
// log(1 + count / P) / log K with P the capacity-weighted habitable patch count
// (study/sweep_point.hpp habitable_patches), as the series' own column defines it.
#pragma once

#include <filesystem>
#include <string>

#include "core/scenario.hpp"

namespace tessera {

std::string ensemble_header();

// The text of ensemble.csv from the text of series.csv. Throws std::runtime_error naming
// the line when series.csv is not what a finished run writes (replicates of unequal length,
// a malformed row).
std::string ensemble_csv(const std::string& series_csv, const Scenario& scenario);

// Reads `series`, writes `ensemble` (beside it, through a temporary file and a rename).
// Throws std::runtime_error naming the file on failure.
void write_ensemble(const std::filesystem::path& series, const std::filesystem::path& ensemble,
                    const Scenario& scenario);

}  // namespace tessera
