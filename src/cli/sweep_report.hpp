// The table a finished sweep prints: per point and source, the fraction of replicates in each
// regime and the traits resident in at least half of them, read back from summary.csv (so a
// resumed sweep prints the same table as an uninterrupted one).
#pragma once

#include <filesystem>
#include <ostream>

#include "study/parameter_grid.hpp"

namespace tessera::cli {

void print_sweep_report(const std::filesystem::path& dir, const ParameterGrid& grid, std::ostream& out);

}  // namespace tessera::cli
