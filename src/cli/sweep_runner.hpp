// Running a sweep's points into its directory (docs/formats.md "Sweeps"), fresh or resumed.
//
// Work items are (point, limit) and (point, replicate r), handed out in point order by an
// atomic counter to `threads` workers, so the points finish roughly in order. A finished
// point waits in a reorder buffer until every point before it is written; then its rows are
// appended to outcomes.csv, final_exponents.csv and summary.csv, flushed, and sweep.state
// records it. So the tables of a stopped sweep are always a prefix of the finished sweep's,
// and the bytes never depend on the thread count or the shard split.
//
// Under an MPI launcher every rank calls run_sweep: the tasks are shared out over the ranks
// (sweep_ranks.hpp) and rank 0 alone writes, the same bytes.
//
// Ctrl-C (or SIGTERM) stops the running points after their current step; the written points
// stay, exit code 130 (143); `tessera resume DIR` continues. A second Ctrl-C leaves at once
// (the state file is only ever replaced by rename, so the directory still resumes).
#pragma once

#include <filesystem>

#include "cli/sweep_grid.hpp"
#include "cli/sweep_manifest.hpp"

namespace tessera::cli {

struct SweepRunOptions {
    int threads = 0;  // 0: all cores
    bool quiet = false;
    bool resume = false;  // continue from sweep.state instead of starting the tables afresh
};

// Exit code: 0 done, 2 bad input or an output that cannot be written, 130/143 interrupted.
// Test hook: with the environment variable TESSERA_SWEEP_STOP_AFTER=k the sweep behaves as
// if Ctrl-C came right after its k-th written point (tests/sweep_cli_test.cpp).
int run_sweep(const LoadedGrid& grid, const SweepManifest& manifest, const std::filesystem::path& dir,
              const SweepRunOptions& options);

// Under MPI, rank 0 tells the other ranks (waiting in run_sweep) that the sweep does not
// start, and why (`code`); returns `code`. Without MPI, just `code`.
int sweep_start_failed(int code);

// The points of shard I/N: every point i with i % N == I - 1, in order.
std::vector<std::size_t> shard_points(std::size_t points, int shard_index, int shard_count);

}  // namespace tessera::cli
