// The processes of one run started by an MPI launcher (mpirun, or a cluster scheduler's own):
// the only door of the rest of the program to MPI, which only src/cluster/*.cpp include.
// Built without MPI (CMake found none), every process is alone: size() is 1 and
// lattice_partition() gives nothing. docs/guide.md "Running on a cluster".
#pragma once

#include <memory>
#include <string>

#include "core/lattice_partition.hpp"

namespace tessera::cluster {

// Joins the launcher's processes for the lifetime of this object, when one started this
// process (a plain `tessera run` stays a plain process and never starts MPI).
class Launch {
public:
    Launch(int& argc, char**& argv);
    ~Launch();
    Launch(const Launch&) = delete;
    Launch& operator=(const Launch&) = delete;
    // Empty, or why the launch settings are unusable (the message names the variable).
    const std::string& error() const { return error_; }

private:
    std::string error_;
};

bool active();  // an MPI launcher started us and MPI is running
int rank();     // 0 when not active
int size();     // 1 when not active
// "with MPI (Open MPI v4.1.4)" or "without MPI", for --version.
std::string build_description();

// The lattice split into bands of rows over every process; nothing when not active.
std::unique_ptr<LatticePartition> lattice_partition(int height, bool periodic);

// Rank 0's `code` on every process (each passes its own; only rank 0's counts). Without
// MPI, `code` itself.
int code_of_rank0(int code);
// The largest of every process's `value` (collective). Without MPI, `value`.
int max_over_ranks(int value);
// Ends every process of the run with `code`, at once (after rank 0 met an error the others
// cannot see, so that they do not wait for it). Without MPI, std::exit(code).
[[noreturn]] void stop_all(int code);

}  // namespace tessera::cluster
