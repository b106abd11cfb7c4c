// Engine: the part of a run split over processes (core/lattice_partition.hpp): attaching a
// partition, the agreed stop, sharing the state and cutting the bands.
#include <algorithm>
#include <stdexcept>
#include <string>
#include <type_traits>

#include "core/engine.hpp"

namespace tessera {

namespace {

bool occupied(const Lattice& lattice, std::size_t p) {
    const std::int64_t* a = lattice.active(p);
    const std::int64_t* d = lattice.dormant(p);
    for (int i = 0; i < lattice.traits(); ++i) {
        if (a[i] != 0 || d[i] != 0) return true;
    }
    return false;
}

}  // namespace

void Engine::set_partition(LatticePartition* partition) {
    if (partition && partition->processes() > 1) {
        const std::string n = std::to_string(partition->processes());
        if (scenario_.method == Method::exact_spatial)
            throw std::invalid_argument("method = \"exact-spatial\" is one event queue over the whole lattice, serial "
                                        "by nature, so it cannot be split over " + n +
                                        " processes: run it as one process, or choose method = \"exact\", \"leap\" or "
                                        "\"auto\"");
        if (lattice_.height() < partition->processes())
            throw std::invalid_argument("the lattice has " + std::to_string(lattice_.height()) +
                                        " rows, too few to give each of " + n +
                                        " processes a band of rows: use at most " +
                                        std::to_string(lattice_.height()) + " processes");
#ifdef TESSERA_VALIDATE
        throw std::invalid_argument("the validate mode checks the whole lattice after every step: run it as one process");
#endif
    }
    partition_ = partition;
    stop_agreed_ = false;
    shared_step_ = step_;
    lost_shared_ = lost_;
    migrants_shared_ = migrants_;
    events_at_balance_.assign(lattice_.patches(), 0);
    balance_step_ = step_;
    band_ = {0, lattice_.height()};
    if (partition_) rebalance();
}

bool Engine::stop_agreed(const std::atomic<bool>* stop) {
    if (!partition_) return stop && stop->load();
    if (stop_agreed_) return true;
    bool halt = stop && stop->load();
    double unused = 0.0;
    partition_->agree(halt, unused);
    stop_agreed_ = halt;
    return halt;
}

void Engine::share_state() {
    static_assert(sizeof(EventCounts) % sizeof(std::uint64_t) == 0 && std::is_standard_layout_v<EventCounts>,
                  "EventCounts is shared as an array of 64-bit counters");
    constexpr std::size_t counters = sizeof(EventCounts) / sizeof(std::uint64_t);
    const std::size_t W = static_cast<std::size_t>(lattice_.width());
    const std::size_t T = static_cast<std::size_t>(lattice_.traits());
    partition_->share_rows(reinterpret_cast<std::uint64_t*>(lattice_.active(0)), W * T);
    partition_->share_rows(reinterpret_cast<std::uint64_t*>(lattice_.dormant(0)), W * T);
    partition_->share_rows(reinterpret_cast<std::uint64_t*>(patch_counts_.data()), W * counters);
    // Integer sums: exact in any order, so the totals equal one process's.
    std::uint64_t since[2] = {lost_ - lost_shared_, migrants_ - migrants_shared_};
    partition_->sum(since, 2);
    lost_ = lost_shared_ + since[0];
    migrants_ = migrants_shared_ + since[1];
    lost_shared_ = lost_;
    migrants_shared_ = migrants_;
    shared_step_ = step_;
    rebalance();
}

// The cost of a patch since the last balance: its events while it is simulated event by
// event, but at most what a leap costs (the auto method leaps above auto_leap_events per
// step, and a leap's cost does not grow with its events); an occupied patch costs at least
// one, an empty one nothing. Computed from shared numbers only, so identical everywhere.
// The bands change only the speed, never a bit of the results.
void Engine::rebalance() {
    const int W = lattice_.width();
    const double steps = static_cast<double>(std::max<std::uint64_t>(1, step_ - balance_step_));
    std::vector<double> row_cost(static_cast<std::size_t>(lattice_.height()), 0.0);
    for (int row = 0; row < lattice_.height(); ++row) {
        for (int col = 0; col < W; ++col) {
            const std::size_t p = lattice_.patch_at(col, row);
            const std::uint64_t events = patch_counts_[p].events();
            const double recent = static_cast<double>(events - events_at_balance_[p]);
            events_at_balance_[p] = events;
            if (!occupied(lattice_, p) && recent == 0) continue;
            row_cost[static_cast<std::size_t>(row)] += 1.0 + std::min(recent, auto_leap_events * steps);
        }
    }
    balance_step_ = step_;
    partition_->rebalance(row_cost);
    band_ = partition_->band();
}

}  // namespace tessera
