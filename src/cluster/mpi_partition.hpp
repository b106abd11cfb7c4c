// LatticePartition over MPI ranks: bands of whole rows in rank order (core/lattice_partition.hpp).
// Each rank steps and holds only its band (rank 0 holds the whole lattice for the files); the
// halo exchange moves the migrant boxes of the rows next to each band, gather_rows brings the
// bands to rank 0 at output times, and move_rows sends rows that change band to their new
// owner, point to point.
#pragma once

#include <mpi.h>

#include <vector>

#include "core/lattice_partition.hpp"

namespace tessera::cluster {

class MpiPartition final : public LatticePartition {
public:
    MpiPartition(int height, bool periodic, MPI_Comm comm);

    int processes() const override { return size_; }
    int process() const override { return rank_; }
    RowBand band() const override { return {start_[rank_], start_[rank_ + 1]}; }
    void rebalance(std::vector<double>& row_cost) override;
    void exchange_rows(std::int64_t* data, std::size_t values_per_row) override;
    void gather_rows(std::uint64_t* data, std::size_t values_per_row) override;
    void move_rows(const std::uint64_t* before, std::uint64_t* after, std::size_t values_per_row) override;
    void sum(std::uint64_t* values, int count) override;
    void agree(bool& stop, double& largest) override;

    // The first row of each rank's band, then the height: [size + 1].
    const std::vector<int>& starts() const { return start_; }

private:
    // The rows next to rank q's band that it reads (core's halo_rows); the position in
    // this list is the message tag.
    std::vector<int> halo_of(int q) const;
    int owner(int row) const;

    int height_;
    bool periodic_;
    MPI_Comm comm_;
    int rank_ = 0;
    int size_ = 1;
    std::vector<int> start_;
    std::vector<int> start_before_;  // the bands before the last rebalance
    std::vector<MPI_Request> requests_;
};

}  // namespace tessera::cluster
