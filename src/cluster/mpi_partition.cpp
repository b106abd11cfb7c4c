#include "cluster/mpi_partition.hpp"

#include <algorithm>
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
    start_ = cut_bands(std::vector<double>(static_cast<std::size_t>(height_), 0.0), size_);
    start_before_ = start_;
}

// Each rank priced its own rows: an all-gather makes the prices, and so the cut, the same.
void MpiPartition::rebalance(std::vector<double>& row_cost) {
    std::vector<int> counts(static_cast<std::size_t>(size_)), displs(static_cast<std::size_t>(size_));
    for (std::size_t q = 0; q < counts.size(); ++q) {
        counts[q] = start_[q + 1] - start_[q];
        displs[q] = start_[q];
    }
    MPI_Request request;
    MPI_Iallgatherv(MPI_IN_PLACE, 0, MPI_DATATYPE_NULL, row_cost.data(), counts.data(), displs.data(), MPI_DOUBLE,
                    comm_, &request);
    wait_all(1, &request, "sharing the cost of the rows");
    start_before_ = start_;
    start_ = cut_bands(row_cost, size_);
}

int MpiPartition::owner(int row) const { return band_of_row(start_, row); }

std::vector<int> MpiPartition::halo_of(int q) const { return halo_rows(start_, q, periodic_); }

void MpiPartition::exchange_rows(std::int64_t* data, std::size_t values_per_row) {
    const int n = checked_count(values_per_row);
    const RowBand mine_band = band();
    const auto at = [&](int row) { return data + halo_slot(mine_band, height_, row) * values_per_row; };
    requests_.clear();
    const std::vector<int> mine = halo_of(rank_);
    for (std::size_t k = 0; k < mine.size(); ++k) {
        requests_.emplace_back();
        MPI_Irecv(at(mine[k]), n, MPI_INT64_T, owner(mine[k]), static_cast<int>(k), comm_, &requests_.back());
    }
    for (int q = 0; q < size_; ++q) {
        if (q == rank_) continue;
        const std::vector<int> theirs = halo_of(q);
        for (std::size_t k = 0; k < theirs.size(); ++k) {
            if (owner(theirs[k]) != rank_) continue;
            requests_.emplace_back();
            MPI_Isend(at(theirs[k]), n, MPI_INT64_T, q, static_cast<int>(k), comm_, &requests_.back());
        }
    }
    wait_all(static_cast<int>(requests_.size()), requests_.data(), "exchanging migrants with the neighbouring bands");
}

void MpiPartition::gather_rows(std::uint64_t* data, std::size_t values_per_row) {
    std::vector<int> counts(static_cast<std::size_t>(size_)), displs(static_cast<std::size_t>(size_));
    for (int q = 0; q < size_; ++q) {
        const std::size_t first = static_cast<std::size_t>(start_[static_cast<std::size_t>(q)]);
        const std::size_t end = static_cast<std::size_t>(start_[static_cast<std::size_t>(q) + 1]);
        counts[static_cast<std::size_t>(q)] = checked_count((end - first) * values_per_row);
        displs[static_cast<std::size_t>(q)] = checked_count(first * values_per_row);
    }
    MPI_Request request;
    if (rank_ == 0) {
        MPI_Igatherv(MPI_IN_PLACE, 0, MPI_DATATYPE_NULL, data, counts.data(), displs.data(), MPI_UINT64_T, 0, comm_,
                     &request);
    } else {
        MPI_Igatherv(data, counts[static_cast<std::size_t>(rank_)], MPI_UINT64_T, nullptr, nullptr, nullptr,
                     MPI_UINT64_T, 0, comm_, &request);
    }
    wait_all(1, &request, "gathering the bands' patches on rank 0 for the outputs");
}

// The rows of (old band of a) and (new band of b) overlap in one run of rows at most.
void MpiPartition::move_rows(const std::uint64_t* before, std::uint64_t* after, std::size_t values_per_row) {
    if (!before) return;  // this band did not change: no rows come or go
    constexpr int tag = 30000;  // apart from the exchange's tags (positions in a halo list), below MPI's least MPI_TAG_UB
    const auto overlap = [&](int a, int b) {
        const int first = std::max(start_before_[static_cast<std::size_t>(a)], start_[static_cast<std::size_t>(b)]);
        const int end = std::min(start_before_[static_cast<std::size_t>(a) + 1], start_[static_cast<std::size_t>(b) + 1]);
        return RowBand{first, std::max(first, end)};
    };
    const int old_first = start_before_[static_cast<std::size_t>(rank_)];
    const int new_first = start_[static_cast<std::size_t>(rank_)];
    requests_.clear();
    for (int q = 0; q < size_; ++q) {
        const RowBand in = overlap(q, rank_), out = overlap(rank_, q);
        if (q == rank_) {
            if (in.end > in.first)
                    std::copy(before + static_cast<std::size_t>(in.first - old_first) * values_per_row,
                          before + static_cast<std::size_t>(in.end - old_first) * values_per_row,
                          after + static_cast<std::size_t>(in.first - new_first) * values_per_row);
            continue;
        }
        if (in.end > in.first) {
            requests_.emplace_back();
            MPI_Irecv(after + static_cast<std::size_t>(in.first - new_first) * values_per_row,
                      checked_count(static_cast<std::size_t>(in.end - in.first) * values_per_row), MPI_UINT64_T, q, tag,
                      comm_, &requests_.back());
        }
        if (out.end > out.first) {
            requests_.emplace_back();
            MPI_Isend(before + static_cast<std::size_t>(out.first - old_first) * values_per_row,
                      checked_count(static_cast<std::size_t>(out.end - out.first) * values_per_row), MPI_UINT64_T, q,
                      tag, comm_, &requests_.back());
        }
    }
    wait_all(static_cast<int>(requests_.size()), requests_.data(), "moving rows to their new bands");
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
