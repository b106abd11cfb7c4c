#include "cluster/collective_wait.hpp"

#include <chrono>
#include <cstdio>
#include <thread>

namespace tessera::cluster {

namespace {
double timeout_seconds = 600.0;
}

double rank_timeout() { return timeout_seconds; }
void set_rank_timeout(double seconds) { timeout_seconds = seconds; }

void wait_all(int count, MPI_Request* requests, const char* what) {
    using Clock = std::chrono::steady_clock;
    const auto deadline = Clock::now() + std::chrono::duration<double>(timeout_seconds);
    // Test at once a few times (neighbours usually answer within microseconds), then nap
    // between tests: with more ranks than cores a spinning rank would take the core from
    // the rank it waits for.
    int tries = 0;
    for (;;) {
        int done = 0;
        MPI_Testall(count, requests, &done, MPI_STATUSES_IGNORE);
        if (done) return;
        if (++tries > 64) std::this_thread::sleep_for(std::chrono::microseconds(tries > 4096 ? 1000 : 20));
        if (Clock::now() > deadline) {
            int rank = 0, size = 1;
            MPI_Comm_rank(MPI_COMM_WORLD, &rank);
            MPI_Comm_size(MPI_COMM_WORLD, &size);
            std::fprintf(stderr,
                         "error: rank %d of %d: no word from the other ranks for %g s while %s; a rank has "
                         "probably died or hangs, so the run stops here (TESSERA_RANK_TIMEOUT sets the wait in "
                         "seconds; the last checkpoint.bin can be resumed)\n",
                         rank, size, timeout_seconds, what);
            std::fflush(stderr);
            MPI_Abort(MPI_COMM_WORLD, 1);
        }
    }
}

}  // namespace tessera::cluster
