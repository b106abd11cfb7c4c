// Waiting for MPI's nonblocking operations with a deadline, so that a rank that died or hangs
// makes the others stop with a message instead of waiting for ever. The deadline is the
// only use of wall time here: it never changes what is computed, only when we give up.
#pragma once

#include <mpi.h>

namespace tessera::cluster {

// Seconds to wait for the other ranks in one collective step; TESSERA_RANK_TIMEOUT sets it.
// A step waits for the slowest band, so the default is generous: 600 s.
double rank_timeout();
void set_rank_timeout(double seconds);

// Waits until every request is done; after rank_timeout() seconds prints which rank waited
// for what (`what` names the step) and aborts the whole run with exit code 1.
void wait_all(int count, MPI_Request* requests, const char* what);

}  // namespace tessera::cluster
