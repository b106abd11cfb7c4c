#include "core/exact_spatial.hpp"

#include <limits>

#include "core/event_queue.hpp"

namespace tessera {

ExactSpatial::ExactSpatial(const TraitGrid& grid, const RateTable& rates, const Scenario& s)
    : neighbourhood_(s.width, s.height, s.neighbourhood, s.boundary),
      boundary_(s.boundary),
      migration_active_(s.rates.migration),
      migration_dormant_(s.rates.migration_dormant) {
    patches_.reserve(static_cast<std::size_t>(s.width) * s.height);
    for (int p = 0; p < s.width * s.height; ++p) patches_.emplace_back(grid, rates, s.K);
}

// Local events plus jumps out. A jump towards a wall or off a reflecting edge is an event
// that leaves the cell where it is, exactly as in the split engine.
double ExactSpatial::patch_rate(std::size_t p, const std::vector<PatchConditions>& conditions) const {
    const ExactPatch& e = patches_[p];
    const double out = conditions[p].permeability *
                       (migration_active_ * static_cast<double>(e.active_total()) +
                        migration_dormant_ * static_cast<double>(e.dormant_total()));
    return e.total_rate() + out;
}

// One jump out of patch p: a cell chosen among those that may jump (active at rate m,
// dormant at rate m_dormant), a direction chosen uniformly.
void ExactSpatial::jump(Lattice& lattice, std::size_t p, const std::vector<PatchConditions>& conditions, Rng& rng,
                        Tally& tally, std::int64_t& touched) {
    ExactPatch& from = patches_[p];
    const double wa = migration_active_ * static_cast<double>(from.active_total());
    const double wd = migration_dormant_ * static_cast<double>(from.dormant_total());
    const bool active = rng.uniform() * (wa + wd) < wa;
    const auto n = static_cast<std::uint64_t>(active ? from.active_total() : from.dormant_total());
    if (n == 0) return;
    const int trait = active ? from.active_cell(rng.below(n)) : from.dormant_cell(rng.below(n));
    const int dir = static_cast<int>(rng.below(static_cast<std::uint64_t>(neighbourhood_.size())));
    const int col = static_cast<int>(p % static_cast<std::size_t>(lattice.width()));
    const int row = static_cast<int>(p / static_cast<std::size_t>(lattice.width()));
    const auto to = neighbourhood_.step(col, row, dir);
    if (to.kind == Neighbourhood::Target::off_edge) {
        if (boundary_ != Boundary::absorbing) return;  // reflected: the cell stays
        if (active) {
            from.add_active(trait, -1);
        } else {
            from.add_dormant(trait, -1);
        }
        ++tally.lost;
        if (tally.lost_from) ++(*tally.lost_from)[p];
        return;
    }
    const auto q = static_cast<std::size_t>(to.patch);
    if (conditions[q].capacity <= 0) return;  // a wall: the cell stays
    if (active) {
        from.add_active(trait, -1);
        patches_[q].add_active(trait, +1);
    } else {
        from.add_dormant(trait, -1);
        patches_[q].add_dormant(trait, +1);
    }
    ++tally.migrants;
    if (tally.emigrated) ++(*tally.emigrated)[p];
    if (tally.immigrated) ++(*tally.immigrated)[q];
    touched = to.patch;
}

void ExactSpatial::advance(Lattice& lattice, const std::vector<PatchConditions>& conditions, double duration,
                           Rng& rng, std::vector<EventCounts>& counts, Tally& tally) {
    const std::size_t P = lattice.patches();
    constexpr double never = std::numeric_limits<double>::infinity();
    EventQueue queue(P);
    std::vector<double> rate(P);
    for (std::size_t p = 0; p < P; ++p) {
        patches_[p].attach(lattice.active(p), lattice.dormant(p), conditions[p]);
        rate[p] = patch_rate(p, conditions);
        queue.update(p, rate[p] > 0 ? rng.exponential() / rate[p] : never);
    }
    // A patch whose rate changed draws a fresh waiting time: by the memoryless property this
    // is as exact as rescaling the old one, and simpler.
    auto redraw = [&](std::size_t p, double now) {
        rate[p] = patch_rate(p, conditions);
        queue.update(p, rate[p] > 0 ? now + rng.exponential() / rate[p] : never);
    };
    for (;;) {
        const double now = queue.top_time();
        if (!(now < duration)) break;
        const std::size_t p = queue.top();
        ExactPatch& patch = patches_[p];
        const double local = patch.total_rate();
        std::int64_t touched = -1;
        if (rng.uniform() * rate[p] < local) {
            patch.fire(rng, counts[p]);
        } else {
            jump(lattice, p, conditions, rng, tally, touched);
        }
        redraw(p, now);
        if (touched >= 0) redraw(static_cast<std::size_t>(touched), now);
    }
}

}  // namespace tessera
