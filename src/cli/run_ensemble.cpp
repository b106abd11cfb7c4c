#include "cli/run_ensemble.hpp"

#include <iostream>
#include <stdexcept>

#include "io/ensemble_table.hpp"

namespace tessera::cli {

bool write_run_ensemble(const std::filesystem::path& dir, const Scenario& scenario, int replicates) {
    if (replicates < 2) return true;
    try {
        write_ensemble(dir / "series.csv", dir / "ensemble.csv", scenario);
    } catch (const std::exception& e) {
        std::cerr << "error: " << e.what() << "\n";
        return false;
    }
    return true;
}

}  // namespace tessera::cli
