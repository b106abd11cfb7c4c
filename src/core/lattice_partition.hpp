// How the processes of one run share a lattice (docs/guide.md "Running on a cluster").
//
// The engine steps only the rows of its band, and a process other than 0 holds the state of
// those rows only (process 0 writes every file, so it keeps room for the whole lattice).
// Everything a band needs from outside it in a step is the outgoing migrant buffer of the
// rows just above and below it (the 4- and 8-neighbourhoods only reach the next row; with
// periodic wrap, across the edge): exchange_rows() brings those in after the emigration
// phase, so the immigration phase runs unchanged and adds the same numbers in the same
// direction order as one process does. Random streams belong to patches, so which process
// steps a patch does not change a bit.
//
// At output times (and every few steps, to rebalance) gather_rows() brings every band to
// process 0, whose copy is then whole; integer sums (cells lost, migrants) are summed
// exactly. The split comes from per-row costs that each process computes for its own rows
// and rebalance() shares, never from wall time, so the bands are identical everywhere;
// move_rows() then hands the rows that changed band to their new owners.
//
// src/core knows only this interface: src/cluster implements it with MPI. A plain process
// has no partition at all (the engine then steps every row).
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

namespace tessera {

struct RowBand {
    int first = 0;  // rows [first, end)
    int end = 0;
};

class LatticePartition {
public:
    virtual ~LatticePartition() = default;

    virtual int processes() const = 0;
    virtual int process() const = 0;  // this one, 0 .. processes() - 1
    // This process's rows.
    virtual RowBand band() const = 0;
    // New bands from the cost of each row: this process fills the rows of its band (the
    // others are overwritten), the partition shares them, so that the cut is the same on
    // every process: contiguous, in process order, at least one row each, each near an
    // equal share of the total cost. The bands before stay known to move_rows().
    virtual void rebalance(std::vector<double>& row_cost) = 0;

    // `data` holds `values_per_row` numbers per row for this band's rows with one row of room
    // on either side, in halo_slot() order. Fills the rows just outside this band (above and
    // below; wrapped when the lattice is periodic) from their owners, and sends this band's
    // edge rows to the processes that need them.
    virtual void exchange_rows(std::int64_t* data, std::size_t values_per_row) = 0;
    // Every band to process 0: there `data` holds every row of the lattice and receives the
    // other bands' rows; elsewhere it holds this band's rows, which are sent.
    virtual void gather_rows(std::uint64_t* data, std::size_t values_per_row) = 0;
    // After rebalance(), on every process: `before` holds this process's rows of the bands before it, `after`
    // receives the rows of its new band (kept ones copied, the others from their old owners).
    // A process whose band did not change passes nullptr for both (it sends and gets nothing).
    virtual void move_rows(const std::uint64_t* before, std::uint64_t* after, std::size_t values_per_row) = 0;
    // Sums `values` over the processes, in place.
    virtual void sum(std::uint64_t* values, int count) = 0;
    // One agreement per step: `stop` becomes true when any process asks to stop, `largest`
    // the largest value any process passed.
    virtual void agree(bool& stop, double& largest) = 0;
};

// The band arithmetic every implementation shares (src/core/lattice_partition.cpp), so that
// it is tested without MPI (tests/partition_test.cpp).
//
// The first row of each of `parts` bands of `row_cost.size()` rows, then the height
// ([parts + 1]): cut where the running cost crosses k / parts of the total (the nearer of the
// two rows around the crossing), at least one row per band; equal bands when nothing costs.
// Needs parts <= rows.
std::vector<int> cut_bands(const std::vector<double>& row_cost, int parts);
// The rows next to band q (of `starts`, as cut_bands gives) that its immigration phase reads:
// the row above, then the row below, wrapped when periodic, left out off a closed edge, inside
// the band itself or when already listed. The position in the list names the message.
std::vector<int> halo_rows(const std::vector<int>& starts, int q, bool periodic);
// The band holding `row`.
int band_of_row(const std::vector<int>& starts, int row);
// Where `row` is kept in a buffer of a band's rows with one row of room on either side (as
// exchange_rows() fills it): 1 + its place in the band, 0 for the row above (wrapped), the
// band's size + 1 for the row below. `row` is in the band or next to it.
std::size_t halo_slot(RowBand band, int height, int row);

}  // namespace tessera
