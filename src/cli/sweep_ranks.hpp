// A sweep under an MPI launcher (docs/guide.md "Running on a cluster"): the tasks of
// sweep_task.hpp are handed out by rank 0, a few at a time and in task order, to whichever
// rank asks (rank 0's own threads take theirs from the same counter), so the work follows
// the ranks' speed. Each rank runs its tasks with its own threads; the outcomes travel to
// rank 0, whose reorder buffer writes them exactly as a plain process would (sweep_runner).
// Only rank 0 writes files; the other ranks write nothing, whatever the options.
//
// A stop (SIGINT or SIGTERM to any rank, the first failed task, or the test hook) reaches
// every rank: a rank that has a signal says so to rank 0, rank 0 tells every rank to stop,
// the running tasks end after their current step, and rank 0 writes the finished points;
// every rank then exits with rank 0's code. A silent rank (cluster/task_link.hpp) ends the
// run after TESSERA_RANK_TIMEOUT seconds with a message; the directory stays resumable.
#pragma once

#include <atomic>
#include <cstddef>
#include <functional>

#include "cli/sweep_task.hpp"
#include "cluster/task_link.hpp"

namespace tessera::cli {

struct SweepStop {
    std::atomic<bool>* requested;  // the tasks stop after their current step when true
    std::atomic<int>* signal;      // the signal that asked for the stop, 0 if none
};

// Rank 0, with more than one rank.
class SweepLead {
public:
    SweepLead() : link_("running the sweep's points") {}
    // Runs `local` (which takes its tasks from `next_item`, as the other ranks' requests do)
    // in a thread of its own while this thread serves the other ranks and passes their
    // outcomes to `deliver`; returns when `local` has returned and every rank has finished.
    void run(std::size_t items, std::atomic<std::size_t>& next_item, const std::function<void()>& local,
             const std::function<void(TaskOutcome&&)>& deliver, SweepStop stop);
    // Tells every rank the exit code and closes the link.
    void end(int code);

private:
    cluster::TaskLink link_;
};

// Every rank but 0: runs the tasks rank 0 hands out with `threads` threads until there are
// no more or a stop; returns rank 0's exit code.
int follow_sweep(const SweepWork& work, int threads, SweepStop stop);

}  // namespace tessera::cli
