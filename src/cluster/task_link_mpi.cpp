// cluster/task_link.hpp with MPI: data on one tag, heartbeats on another, both nonblocking.
#include <mpi.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <list>
#include <thread>
#include <vector>

#include "cluster/cluster.hpp"
#include "cluster/collective_wait.hpp"
#include "cluster/task_link.hpp"

namespace tessera::cluster {

namespace {

using Clock = std::chrono::steady_clock;
constexpr int data_tag = 7101;
constexpr int beat_tag = 7102;

struct Outgoing {
    std::string bytes;
    MPI_Request request = MPI_REQUEST_NULL;
};

}  // namespace

struct TaskLink::State {
    std::string what;
    MPI_Comm comm = MPI_COMM_NULL;  // our own, so no other message can match ours
    int rank = 0;
    int size = 1;
    bool closed = false;
    std::vector<int> partners;
    std::vector<char> watched;              // by rank
    std::vector<Clock::time_point> heard;   // by rank
    Clock::time_point last_beat;
    Clock::time_point last_poll;
    std::list<Outgoing> outgoing;           // kept until MPI is done with the buffer
    char beat_byte = 0;

    // A beat about once a second, and at least four within a timeout.
    Clock::duration beat_every() const {
        const double s = std::min(1.0, rank_timeout() / 4);
        return std::chrono::duration_cast<Clock::duration>(std::chrono::duration<double>(s));
    }

    void reap() {
        for (auto it = outgoing.begin(); it != outgoing.end();) {
            int done = 0;
            MPI_Test(&it->request, &done, MPI_STATUS_IGNORE);
            it = done ? outgoing.erase(it) : std::next(it);
        }
    }
};

TaskLink::TaskLink(std::string what) : state_(std::make_unique<State>()) {
    State& s = *state_;
    s.what = std::move(what);
    if (!active()) {
        s.closed = true;
        return;
    }
    MPI_Comm_dup(MPI_COMM_WORLD, &s.comm);
    MPI_Comm_rank(s.comm, &s.rank);
    MPI_Comm_size(s.comm, &s.size);
    if (s.rank == 0) {
        for (int q = 1; q < s.size; ++q) s.partners.push_back(q);
    } else {
        s.partners.push_back(0);
    }
    s.watched.assign(static_cast<std::size_t>(s.size), 0);
    for (int q : s.partners) s.watched[static_cast<std::size_t>(q)] = 1;
    s.heard.assign(static_cast<std::size_t>(s.size), Clock::now());
    s.last_beat = Clock::now() - s.beat_every();
    s.last_poll = Clock::now();
}

TaskLink::~TaskLink() {
    if (!state_->closed) close();
}

void TaskLink::send(int to, const std::string& bytes) {
    State& s = *state_;
    if (s.closed) return;
    s.outgoing.push_back({bytes, MPI_REQUEST_NULL});
    Outgoing& o = s.outgoing.back();
    MPI_Isend(o.bytes.data(), static_cast<int>(o.bytes.size()), MPI_BYTE, to, data_tag, s.comm, &o.request);
}

void TaskLink::watch(int partner, bool on) {
    State& s = *state_;
    if (s.closed) return;
    s.watched[static_cast<std::size_t>(partner)] = on ? 1 : 0;
    s.heard[static_cast<std::size_t>(partner)] = Clock::now();
}

std::optional<LinkMessage> TaskLink::poll() {
    State& s = *state_;
    if (s.closed) return std::nullopt;
    const auto now = Clock::now();
    // A long gap since our own last look means this rank was the one not running (stopped,
    // or starved of a core): the partners' silence meanwhile says nothing about them.
    if (std::chrono::duration<double>(now - s.last_poll).count() > rank_timeout() / 2)
        for (auto& t : s.heard) t = now;
    s.last_poll = now;
    if (now - s.last_beat >= s.beat_every()) {
        for (int q : s.partners) {
            s.outgoing.push_back({std::string(), MPI_REQUEST_NULL});
            MPI_Isend(&s.beat_byte, 0, MPI_BYTE, q, beat_tag, s.comm, &s.outgoing.back().request);
        }
        s.last_beat = now;
    }
    s.reap();
    for (;;) {  // heartbeats first: they only say "alive"
        int flag = 0;
        MPI_Status status;
        MPI_Iprobe(MPI_ANY_SOURCE, beat_tag, s.comm, &flag, &status);
        if (!flag) break;
        MPI_Recv(&s.beat_byte, 0, MPI_BYTE, status.MPI_SOURCE, beat_tag, s.comm, MPI_STATUS_IGNORE);
        s.heard[static_cast<std::size_t>(status.MPI_SOURCE)] = now;
    }
    int flag = 0;
    MPI_Status status;
    MPI_Iprobe(MPI_ANY_SOURCE, data_tag, s.comm, &flag, &status);
    if (flag) {
        int count = 0;
        MPI_Get_count(&status, MPI_BYTE, &count);
        LinkMessage m;
        m.from = status.MPI_SOURCE;
        m.bytes.resize(static_cast<std::size_t>(count));
        MPI_Recv(m.bytes.data(), count, MPI_BYTE, m.from, data_tag, s.comm, MPI_STATUS_IGNORE);
        s.heard[static_cast<std::size_t>(m.from)] = now;
        return m;
    }
    const double timeout = rank_timeout();
    for (int q : s.partners) {
        const std::size_t i = static_cast<std::size_t>(q);
        if (!s.watched[i] || std::chrono::duration<double>(now - s.heard[i]).count() <= timeout) continue;
        std::fprintf(stderr,
                     "error: rank %d of %d: no word from rank %d for %g s while %s; that rank has probably died "
                     "or hangs, so the run stops here (TESSERA_RANK_TIMEOUT sets the wait in seconds; what is "
                     "written so far can be resumed)\n",
                     s.rank, s.size, q, timeout, s.what.c_str());
        std::fflush(stderr);
        MPI_Abort(MPI_COMM_WORLD, 1);
    }
    return std::nullopt;
}

void TaskLink::close() {
    State& s = *state_;
    if (s.closed) return;
    s.closed = true;
    MPI_Request barrier;
    MPI_Ibarrier(s.comm, &barrier);
    wait_all(1, &barrier, ("finishing " + s.what).c_str());
    // Heartbeats sent before the barrier may still be unread: read them, so that none is
    // left matched to nothing when the communicator goes.
    for (;;) {
        int flag = 0;
        MPI_Status status;
        MPI_Iprobe(MPI_ANY_SOURCE, beat_tag, s.comm, &flag, &status);
        if (!flag) break;
        MPI_Recv(&s.beat_byte, 0, MPI_BYTE, status.MPI_SOURCE, beat_tag, s.comm, MPI_STATUS_IGNORE);
    }
    std::vector<MPI_Request> pending;
    for (Outgoing& o : s.outgoing) pending.push_back(o.request);
    if (!pending.empty()) wait_all(static_cast<int>(pending.size()), pending.data(), ("finishing " + s.what).c_str());
    s.outgoing.clear();
    MPI_Comm_free(&s.comm);
}

void share_from_rank0(long long* values, int count) {
    if (!active()) return;
    MPI_Request request;
    MPI_Ibcast(values, count, MPI_LONG_LONG, 0, MPI_COMM_WORLD, &request);
    wait_all(1, &request, "waiting for rank 0 to start");
}

}  // namespace tessera::cluster
