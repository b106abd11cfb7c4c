// src/cluster without MPI (CMake found none): every process is alone.
#include <cstdlib>
#include <string>

#include "cluster/cluster.hpp"

namespace tessera::cluster {

// Started by an MPI launcher as one of several processes: each would run the whole job and
// write the same files, so refuse (the launchers we know say how many they started).
Launch::Launch(int&, char**&) {
    for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE"}) {
        const char* n = std::getenv(name);
        if (n && std::atoi(n) > 1)
            error_ = std::string("an MPI launcher started ") + n +
                     " copies of this tessera, which was built without MPI (tessera --version says so), so each "
                     "would run the whole job: run it without the launcher, or build with MPI (install "
                     "libopenmpi-dev and configure again)";
    }
}
Launch::~Launch() = default;
bool active() { return false; }
int rank() { return 0; }
int size() { return 1; }
std::string build_description() { return "without MPI"; }
std::unique_ptr<LatticePartition> lattice_partition(int, bool) { return nullptr; }
int code_of_rank0(int code) { return code; }
int max_over_ranks(int value) { return value; }
void stop_all(int code) { std::exit(code); }

}  // namespace tessera::cluster
