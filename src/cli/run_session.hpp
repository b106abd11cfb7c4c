// A headless run into an output directory, shared by `tessera run` and `tessera demo`:
// replicates in parallel, series written as the run goes, a progress bar, checkpoints
// (checkpoint.bin) and Ctrl-C handled: the step ends, outputs are flushed, a checkpoint is
// written, and `tessera resume` continues bit for bit.
#pragma once

#include <string>

#include "core/scenario.hpp"
#include "io/checkpoint.hpp"

namespace tessera::cli {

struct SessionOptions {
    int replicates = 1;
    bool quiet = false;
    bool overwrite = false;
};

// Prepares `out_dir` (refusing one that already holds a run unless overwrite), writes
// scenario.resolved.toml and runs. Returns the exit code.
int run_session(const Scenario& scenario, const std::string& out_dir, const SessionOptions& options);

// Continues the run in `run_dir` from `checkpoint` (read and checked; `scenario` parsed from
// its text): outputs are cut back to the checkpoint's positions and continued, so the
// finished files equal an uninterrupted run's byte for byte. options.replicates is ignored
// (the checkpoint has them). Returns the exit code.
int resume_session(const Scenario& scenario, const std::string& run_dir, const Checkpoint& checkpoint,
                   const SessionOptions& options);

}  // namespace tessera::cli
