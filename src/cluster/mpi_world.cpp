// src/cluster with MPI: joining the launcher's processes, and what the session asks of them.
#include <mpi.h>

#include <cstdlib>
#include <string>

#include "cluster/cluster.hpp"
#include "cluster/collective_wait.hpp"
#include "cluster/mpi_partition.hpp"

namespace tessera::cluster {

namespace {

bool started = false;
MPI_Comm world = MPI_COMM_NULL;  // our own copy of MPI_COMM_WORLD
int world_rank = 0;
int world_size = 1;

// Set by the launchers we know: Open MPI's mpirun, PMIx (Open MPI 4+, and schedulers that
// start ranks themselves), PMI-1/2 (MPICH's hydra, and schedulers that speak it).
bool launched_by_mpi() {
    for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", "PMI_SIZE"}) {
        if (std::getenv(name)) return true;
    }
    return false;
}

}  // namespace

Launch::Launch(int& argc, char**& argv) {
    if (!launched_by_mpi()) return;
    if (const char* v = std::getenv("TESSERA_RANK_TIMEOUT")) {
        char* end = nullptr;
        const double seconds = std::strtod(v, &end);
        if (end == v || *end != '\0' || !(seconds > 0)) {
            error_ = std::string("TESSERA_RANK_TIMEOUT is \"") + v + "\"; accepted: seconds > 0, e.g. 600";
            return;
        }
        set_rank_timeout(seconds);
    }
    // TBB worker threads exist in every rank, but only each rank's main thread calls MPI:
    // the funnelled level says exactly that (plain MPI_Init promises a single thread).
    int provided = MPI_THREAD_SINGLE;
    MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
    started = true;
    if (provided < MPI_THREAD_FUNNELED)
        error_ = "this MPI library gives no thread support (MPI_THREAD_FUNNELED), which tessera's threads need";
    MPI_Comm_dup(MPI_COMM_WORLD, &world);
    MPI_Comm_rank(world, &world_rank);
    MPI_Comm_size(world, &world_size);
}

Launch::~Launch() {
    if (!started) return;
    MPI_Comm_free(&world);
    MPI_Finalize();
    started = false;
}

bool active() { return started; }
int rank() { return world_rank; }
int size() { return world_size; }

std::string build_description() {
    char library[MPI_MAX_LIBRARY_VERSION_STRING];
    int length = 0;
    MPI_Get_library_version(library, &length);
    std::string name(library, static_cast<std::size_t>(length));
    if (const auto comma = name.find(','); comma != std::string::npos) name.resize(comma);  // "Open MPI v4.1.4"
    while (!name.empty() && (name.back() == '\n' || name.back() == ' ')) name.pop_back();
    return "with MPI (" + name + ")";
}

std::unique_ptr<LatticePartition> lattice_partition(int height, bool periodic) {
    if (!started) return nullptr;
    return std::make_unique<MpiPartition>(height, periodic, world);
}

int code_of_rank0(int code) {
    if (!started) return code;
    MPI_Request request;
    MPI_Ibcast(&code, 1, MPI_INT, 0, world, &request);
    wait_all(1, &request, "waiting for rank 0's outcome");
    return code;
}

int max_over_ranks(int value) {
    if (!started) return value;
    MPI_Request request;
    MPI_Iallreduce(MPI_IN_PLACE, &value, 1, MPI_INT, MPI_MAX, world, &request);
    wait_all(1, &request, "agreeing on the signal that stopped the run");
    return value;
}

void stop_all(int code) {
    if (!started) std::exit(code);
    MPI_Abort(MPI_COMM_WORLD, code);
    std::exit(code);
}

}  // namespace tessera::cluster
