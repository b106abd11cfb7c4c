// A headless run into an output directory, shared by `tessera run` and `tessera demo`:
// replicates in parallel, series written as the run goes, a progress bar, and Ctrl-C
// handled so that what was written stays readable.
#pragma once

#include <string>

#include "core/scenario.hpp"

namespace tessera::cli {

struct SessionOptions {
    int replicates = 1;
    bool quiet = false;
    bool overwrite = false;
};

// Prepares `out_dir` (refusing one that already holds a run unless overwrite), writes
// scenario.resolved.toml and runs. Returns the exit code.
int run_session(const Scenario& scenario, const std::string& out_dir, const SessionOptions& options);

}  // namespace tessera::cli
