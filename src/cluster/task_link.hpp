// Messages between rank 0 and the other ranks while they share out independent tasks (a
// sweep's points and replicates, docs/guide.md "Running on a cluster"). Unlike a lattice
// step, a task may run for hours, so no wait here has a deadline of its own: instead every
// rank sends a small heartbeat to its partners about once a second, and a partner silent
// for TESSERA_RANK_TIMEOUT seconds (cluster/collective_wait.hpp) makes the run stop with a
// message naming it, instead of waiting for ever.
//
// Rank 0 talks with every other rank; the others talk with rank 0 only. Only the thread
// that made the link may use it (the task threads never call MPI). Without MPI (or outside
// a launcher) there are no partners and nothing ever arrives.
#pragma once

#include <memory>
#include <optional>
#include <string>

namespace tessera::cluster {

struct LinkMessage {
    int from = 0;
    std::string bytes;
};

class TaskLink {
public:
    // `what` names the work for the timeout message, e.g. "running the sweep's points".
    explicit TaskLink(std::string what);
    ~TaskLink();  // close() if not yet done
    TaskLink(const TaskLink&) = delete;
    TaskLink& operator=(const TaskLink&) = delete;

    // Sends a copy of `bytes` to rank `to` without waiting for it to arrive.
    void send(int to, const std::string& bytes);
    // The next message that arrived, if any; also sends the heartbeats that are due and
    // ends the whole run (exit code 1, after a message) when a watched partner has been
    // silent longer than the rank timeout.
    std::optional<LinkMessage> poll();
    // Whether silence from rank `partner` counts (rank 0 stops watching a rank that said it
    // has finished; every partner is watched at first).
    void watch(int partner, bool on);
    // Stops the heartbeats, meets every rank once (with the rank timeout) and drops what is
    // left unread. Every rank calls it, after its last send.
    void close();

private:
    struct State;
    std::unique_ptr<State> state_;
};

// Rank 0's `values` on every rank (collective, with the rank timeout). Without MPI, as given.
void share_from_rank0(long long* values, int count);

}  // namespace tessera::cluster
