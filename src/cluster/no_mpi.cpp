// src/cluster without MPI (CMake found none): every process is alone.
#include <cstdlib>

#include "cluster/cluster.hpp"

namespace tessera::cluster {

Launch::Launch(int&, char**&) {}
Launch::~Launch() = default;
bool active() { return false; }
int rank() { return 0; }
int size() { return 1; }
std::string build_description() { return "without MPI"; }
std::unique_ptr<LatticePartition> lattice_partition(int, bool) { return nullptr; }
int code_of_rank0(int code) { return code; }
void stop_all(int code) { std::exit(code); }

}  // namespace tessera::cluster
