// ensemble.csv beside the series.csv of a finished `tessera run --replicates R` (R >= 2):
// computed from the finished series.csv (io/ensemble_table.hpp), so a resumed run gets the
// same file as an uninterrupted one.
#pragma once

#include <filesystem>

#include "core/scenario.hpp"

namespace tessera::cli {

// Writes dir/ensemble.csv when `replicates` >= 2; false (message on stderr) when it fails.
bool write_run_ensemble(const std::filesystem::path& dir, const Scenario& scenario, int replicates);

}  // namespace tessera::cli
