// Engine: the part of a run split over processes (core/lattice_partition.hpp): the rows a
// process holds, the agreed stop, gathering the state on process 0, cutting the bands and
// moving rows between processes when the bands change.
#include <algorithm>
#include <stdexcept>
#include <string>
#include <type_traits>

#include "core/engine.hpp"

namespace tessera {

namespace {

static_assert(sizeof(EventCounts) % sizeof(std::uint64_t) == 0 && std::is_standard_layout_v<EventCounts>,
              "EventCounts travels as an array of 64-bit counters");
constexpr std::size_t counters = sizeof(EventCounts) / sizeof(std::uint64_t);

bool occupied(const Lattice& lattice, std::size_t p) {
    const std::int64_t* a = lattice.active(p);
    const std::int64_t* d = lattice.dormant(p);
    for (int i = 0; i < lattice.traits(); ++i) {
        if (a[i] != 0 || d[i] != 0) return true;
    }
    return false;
}

}  // namespace

// Process 0 writes the files, so it holds every row; any other process its band only.
Lattice Engine::held_lattice(const Scenario& scenario, int traits, LatticePartition* partition) {
    if (partition && partition->processes() > 1) {
        const std::string n = std::to_string(partition->processes());
        if (scenario.method == Method::exact_spatial)
            throw std::invalid_argument("method = \"exact-spatial\" is one event queue over the whole lattice, serial "
                                        "by nature, so it cannot be split over " + n +
                                        " processes: run it as one process, or choose method = \"exact\", \"leap\" or "
                                        "\"auto\"");
        if (scenario.height < partition->processes())
            throw std::invalid_argument("the lattice has " + std::to_string(scenario.height) +
                                        " rows, too few to give each of " + n +
                                        " processes a band of rows: use at most " +
                                        std::to_string(scenario.height) + " processes");
#ifdef TESSERA_VALIDATE
        throw std::invalid_argument("the validate mode checks the whole lattice after every step: run it as one process");
#endif
    }
    if (!partition || partition->process() == 0) return Lattice(scenario.width, scenario.height, traits);
    const RowBand band = partition->band();
    return Lattice(scenario.width, scenario.height, traits, band.first, band.end);
}

void Engine::start_partition() {
    stop_agreed_ = false;
    shared_step_ = step_;
    lost_shared_ = lost_;
    migrants_shared_ = migrants_;
    events_at_balance_.assign(lattice_.held_patches(), 0);
    balance_step_ = step_;
    rebalance();
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
    const std::size_t W = static_cast<std::size_t>(lattice_.width());
    const std::size_t T = static_cast<std::size_t>(lattice_.traits());
    // Process 0 holds every row; the others exactly their band: either way the storage from
    // its start is what gather_rows() takes.
    const std::size_t first = lattice_.first_patch();
    partition_->gather_rows(reinterpret_cast<std::uint64_t*>(lattice_.active(first)), W * T);
    partition_->gather_rows(reinterpret_cast<std::uint64_t*>(lattice_.dormant(first)), W * T);
    partition_->gather_rows(reinterpret_cast<std::uint64_t*>(patch_counts_.data()), W * counters);
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
// one, an empty one nothing. Each process prices its own rows and the partition shares the
// prices, so the bands are identical everywhere. The bands change only the speed, never a
// bit of the results.
void Engine::rebalance() {
    const int W = lattice_.width();
    const std::size_t held = lattice_.first_patch();
    const double steps = static_cast<double>(std::max<std::uint64_t>(1, step_ - balance_step_));
    std::vector<double> row_cost(static_cast<std::size_t>(lattice_.height()), 0.0);
    for (int row = band_.first; row < band_.end; ++row) {
        for (int col = 0; col < W; ++col) {
            const std::size_t p = lattice_.patch_at(col, row);
            const std::uint64_t events = patch_counts_[p - held].events();
            const double recent = static_cast<double>(events - events_at_balance_[p - held]);
            events_at_balance_[p - held] = events;
            if (!occupied(lattice_, p) && recent == 0) continue;
            row_cost[static_cast<std::size_t>(row)] += 1.0 + std::min(recent, auto_leap_events * steps);
        }
    }
    balance_step_ = step_;
    partition_->rebalance(row_cost);
    const RowBand old = band_;
    band_ = partition_->band();
    move_band(old);
}

// Every process takes part; a band that kept its rows sends and receives none, and packs
// nothing. Each row
// travels as its patches' counts, event counts and event counts at the last balance,
// [patch][2 T + counters + 1]. On a process holding its band only, the old band's storage
// and the migrant boxes (rebuilt by the next step) go before the new band's comes, so that
// a move needs no more memory than a step: the packed old band, then the packed new one.
void Engine::move_band(RowBand old) {
    const bool changed = old.first != band_.first || old.end != band_.end;
    const std::size_t W = static_cast<std::size_t>(lattice_.width());
    const std::size_t T = static_cast<std::size_t>(lattice_.traits());
    const std::size_t per_patch = 2 * T + counters + 1;
    if (!changed) {
        partition_->move_rows(nullptr, nullptr, W * per_patch);
        return;
    }
    const bool rehold = !lattice_.whole();
    const std::size_t held = lattice_.first_patch();
    std::vector<std::uint64_t> before(static_cast<std::size_t>(old.end - old.first) * W * per_patch);
    for (std::size_t p = old.first * W, k = 0; p < old.end * W; ++p, k += per_patch) {
        std::copy_n(reinterpret_cast<const std::uint64_t*>(lattice_.active(p)), T, &before[k]);
        std::copy_n(reinterpret_cast<const std::uint64_t*>(lattice_.dormant(p)), T, &before[k + T]);
        std::copy_n(reinterpret_cast<const std::uint64_t*>(&patch_counts_[p - held]), counters, &before[k + 2 * T]);
        before[k + 2 * T + counters] = events_at_balance_[p - held];
    }
    if (rehold) {
        lattice_.hold_rows(band_.first, band_.first);
        patch_counts_ = {};
        events_at_balance_ = {};
        release_step_buffers();
    }
    std::vector<std::uint64_t> after(static_cast<std::size_t>(band_.end - band_.first) * W * per_patch);
    partition_->move_rows(before.data(), after.data(), W * per_patch);
    before = {};
    if (rehold) {
        lattice_.hold_rows(band_.first, band_.end);
        patch_counts_ = std::vector<EventCounts>(lattice_.held_patches());
        events_at_balance_ = std::vector<std::uint64_t>(lattice_.held_patches());
    }
    const std::size_t now = lattice_.first_patch();
    for (std::size_t p = band_.first * W, k = 0; p < band_.end * W; ++p, k += per_patch) {
        std::copy_n(&after[k], T, reinterpret_cast<std::uint64_t*>(lattice_.active(p)));
        std::copy_n(&after[k + T], T, reinterpret_cast<std::uint64_t*>(lattice_.dormant(p)));
        std::copy_n(&after[k + 2 * T], counters, reinterpret_cast<std::uint64_t*>(&patch_counts_[p - now]));
        events_at_balance_[p - now] = after[k + 2 * T + counters];
    }
}

}  // namespace tessera
