#include "cluster/mpi_partition.hpp"

#include <climits>
#include <stdexcept>
#include <string>

#include "cluster/collective_wait.hpp"

namespace tessera::cluster {

namespace {

int checked_count(std::size_t n) {
    if (n > static_cast<std::size_t>(INT_MAX))
        throw std::runtime_error("a band of " + std::to_string(n) +
                                 " numbers is more than one MPI message carries: use more ranks");
    return static_cast<int>(n);
}

}  // namespace

MpiPartition::MpiPartition(int height, bool periodic, MPI_Comm comm)
    : height_(height), periodic_(periodic), comm_(comm) {
    MPI_Comm_rank(comm_, &rank_);
    MPI_Comm_size(comm_, &size_);
    rebalance(std::vector<double>(static_cast<std::size_t>(height_), 0.0));
}

void MpiPartition::rebalance(const std::vector<double>& row_cost) { start_ = cut_bands(row_cost, size_); }

int MpiPartition::owner(int row) const { return band_of_row(start_, row); }

std::vector<int> MpiPartition::halo_of(int q) const { return halo_rows(start_, q, periodic_); }

void MpiPartition::exchange_rows(std::int64_t* data, std::size_t values_per_row) {
    const int n = checked_count(values_per_row);
    requests_.clear();
    const std::vector<int> mine = halo_of(rank_);
    for (std::size_t k = 0; k < mine.size(); ++k) {
        requests_.emplace_back();
        MPI_Irecv(data + static_cast<std::size_t>(mine[k]) * values_per_row, n, MPI_INT64_T, owner(mine[k]),
                  static_cast<int>(k), comm_, &requests_.back());
    }
    for (int q = 0; q < size_; ++q) {
        if (q == rank_) continue;
        const std::vector<int> theirs = halo_of(q);
        for (std::size_t k = 0; k < theirs.size(); ++k) {
            if (owner(theirs[k]) != rank_) continue;
            requests_.emplace_back();
            MPI_Isend(data + static_cast<std::size_t>(theirs[k]) * values_per_row, n, MPI_INT64_T, q,
                      static_cast<int>(k), comm_, &requests_.back());
        }
    }
    wait_all(static_cast<int>(requests_.size()), requests_.data(), "exchanging migrants with the neighbouring bands");
}

void MpiPartition::share_rows(std::uint64_t* data, std::size_t values_per_row) {
    std::vector<int> counts(static_cast<std::size_t>(size_)), displs(static_cast<std::size_t>(size_));
    for (int q = 0; q < size_; ++q) {
        const std::size_t first = static_cast<std::size_t>(start_[static_cast<std::size_t>(q)]);
        const std::size_t end = static_cast<std::size_t>(start_[static_cast<std::size_t>(q) + 1]);
        counts[static_cast<std::size_t>(q)] = checked_count((end - first) * values_per_row);
        displs[static_cast<std::size_t>(q)] = checked_count(first * values_per_row);
    }
    MPI_Request request;
    MPI_Iallgatherv(MPI_IN_PLACE, 0, MPI_DATATYPE_NULL, data, counts.data(), displs.data(), MPI_UINT64_T, comm_,
                    &request);
    wait_all(1, &request, "sharing the bands' patches for the outputs");
}

void MpiPartition::sum(std::uint64_t* values, int count) {
    MPI_Request request;
    MPI_Iallreduce(MPI_IN_PLACE, values, count, MPI_UINT64_T, MPI_SUM, comm_, &request);
    wait_all(1, &request, "summing the lattice totals");
}

void MpiPartition::agree(bool& stop, double& largest) {
    double v[2] = {stop ? 1.0 : 0.0, largest};
    MPI_Request request;
    MPI_Iallreduce(MPI_IN_PLACE, v, 2, MPI_DOUBLE, MPI_MAX, comm_, &request);
    wait_all(1, &request, "agreeing on the next step");
    stop = v[0] > 0;
    largest = v[1];
}

}  // namespace tessera::cluster
