// The tasks of one sweep run and what one task sends back (sweep_runner.hpp writes them).
//
// A run (fresh or resumed) does the points [first, end) of its shard. Task `item` is point
// k = item / per_point of the run and, within it, the limit (j = -1, when the sweep has it)
// or replicate j. Every rank builds the same SweepWork from the same grid, manifest and
// `first`, so a task number means the same on every rank (sweep_ranks.hpp).
#pragma once

#include <atomic>
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "cli/sweep_grid.hpp"
#include "cli/sweep_manifest.hpp"
#include "study/sweep_point.hpp"

namespace tessera::cli {

struct SweepWork {
    std::vector<std::size_t> points;  // the grid index of each point k of this run
    std::vector<Scenario> scenarios;  // per point k, run.seed already the point's seed
    int per_point = 0;                // tasks per point
    bool with_limit = false;
    bool keep_series = false;
    RegimeSettings regimes;

    std::size_t items() const { return points.size() * static_cast<std::size_t>(per_point); }
    std::size_t point_of(std::size_t item) const { return item / static_cast<std::size_t>(per_point); }
    // -1: the limit; else the replicate.
    int replicate_of(std::size_t item) const {
        return static_cast<int>(item % static_cast<std::size_t>(per_point)) - (with_limit ? 1 : 0);
    }
};

// The points [first, end) of the manifest's shard.
SweepWork make_sweep_work(const LoadedGrid& loaded, const SweepManifest& manifest, std::size_t first);

struct TaskOutcome {
    std::size_t item = 0;
    std::optional<PointResult> result;  // empty: stopped before the end (or failed)
    std::string series;                 // --keep-series: the replicate's series.csv rows
    std::string error;                  // not empty: the task threw this
};

// Runs one task to its end, or until `stop` becomes true.
TaskOutcome run_sweep_task(const SweepWork& work, std::size_t item, const std::atomic<bool>* stop);

// A TaskOutcome as bytes for another rank of the same build and machine type (doubles travel
// as their bits, so rank 0 writes exactly what the rank that ran the task computed).
std::string encode_task_outcome(const TaskOutcome& outcome);
TaskOutcome decode_task_outcome(const std::string& bytes);  // throws std::runtime_error

}  // namespace tessera::cli
