// The exact spatial engine (method = "exact-spatial"): every local event of every patch and
// every migration jump are events of one continuous-time Markov chain, simulated with the
// next-subvolume method (Elf & Ehrenberg 2004, Syst. Biol. 1:230-236): each patch holds the
// time of its next event (local or a jump out) in one priority queue; the earliest fires,
// and only the patches it changed draw new times. Serial by nature; it is the reference the
// split engine is tested against, not the fast path.
#pragma once

#include <cstdint>
#include <vector>

#include "core/event_counts.hpp"
#include "core/exact_patch.hpp"
#include "core/lattice.hpp"
#include "core/neighbourhood.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

class ExactSpatial {
public:
    ExactSpatial(const TraitGrid& grid, const RateTable& rates, const Scenario& scenario);

    struct Tally {
        std::uint64_t migrants = 0;  // jumps that moved a cell to another patch
        std::uint64_t lost = 0;      // cells lost through an absorbing edge
        // Per-patch books, kept only when given (the validate mode balances every patch):
        // cells that left each patch, arrived in it, and were lost from it over an edge.
        std::vector<std::uint64_t>* emigrated = nullptr;
        std::vector<std::uint64_t>* immigrated = nullptr;
        std::vector<std::uint64_t>* lost_from = nullptr;
    };

    // Runs the whole lattice for `duration` plain time units. `conditions[p]` holds patch
    // p's habitat conditions for this stretch; per-patch event counts go to counts[p].
    // Exact: waiting times pending at the end are dropped (memoryless).
    void advance(Lattice& lattice, const std::vector<PatchConditions>& conditions, double duration,
                 Rng& rng, std::vector<EventCounts>& counts, Tally& tally);

    // Patch p's engine, attached to its counts (the validate mode checks its kept sums).
    const ExactPatch& patch_engine(std::size_t p) const { return patches_[p]; }

private:
    double patch_rate(std::size_t p, const std::vector<PatchConditions>& conditions) const;
    void jump(Lattice& lattice, std::size_t p, const std::vector<PatchConditions>& conditions, Rng& rng,
              Tally& tally, std::int64_t& touched);

    std::vector<ExactPatch> patches_;
    Neighbourhood neighbourhood_;
    Boundary boundary_;
    double migration_active_;
    double migration_dormant_;
};

}  // namespace tessera
