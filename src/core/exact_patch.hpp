// The exact event-by-event engine for one patch: Gillespie's direct method (Gillespie 1977,
// J. Phys. Chem. 81:2340) over every local event of model.md section 2.
//
// Cost per event does not grow with (number of traits)^2, nor even with the number of
// traits: propensity sums are kept incrementally per channel and per dormancy level (row of
// the trait grid), so choosing the trait of an event scans the x levels and then one row,
// O(x_levels + y_levels). Conjugation pairs are counted through the transfer levels: the
// number of (recipient, donor) pairs with donor y above recipient y is
// sum_{l<l'} L[l] L[l'], with L[l] the active cells at transfer level l, kept up to date in
// O(1) per event.
#pragma once

#include <cstdint>
#include <vector>

#include "core/event_counts.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

class ExactPatch {
public:
    ExactPatch(const TraitGrid& grid, const RateTable& rates, double K);

    // Runs the local events of one patch for `duration` units of plain time. `active` and
    // `dormant` point at the patch's counts (one per trait) and are updated in place. The
    // result is exact: the waiting time pending at the end is dropped, which the memoryless
    // property allows. Returns the number of events.
    std::uint64_t advance(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where,
                          double duration, Rng& rng, EventCounts& counts);

    // The total event rate of the loaded state (for tests and the validate mode).
    double total_rate() const;

private:
    void load(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where);
    void recompute_sums();
    void add_active(int trait, std::int64_t delta);
    void add_dormant(int trait, std::int64_t delta);

    int pick_by_rate(const std::vector<double>& row_sums, const std::vector<double>& rate,
                     double u) const;
    int pick_cell(const std::vector<std::int64_t>& rows, const std::int64_t* counts,
                  std::uint64_t r) const;
    int pick_in_column(int y_level, std::uint64_t r) const;
    void conjugate(Rng& rng);
    void divide(int parent, Rng& rng, EventCounts& counts);

    const TraitGrid& grid_;
    const RateTable& rates_;
    const double K_;
    const int nx_;
    const int ny_;

    // Loaded patch.
    std::int64_t* A_ = nullptr;
    std::int64_t* D_ = nullptr;
    double inv_Kp_ = 0.0;
    double stress_ = 0.0;
    double dormant_rate_ = 0.0;   // kappa + sigma * resuscitation factor
    double dormant_death_share_ = 0.0;

    // Sums kept up to date event by event.
    std::int64_t active_total_ = 0;
    std::int64_t dormant_total_ = 0;
    std::vector<double> birth_rows_, death_rows_, competition_rows_;  // per x level
    double birth_sum_ = 0.0, death_sum_ = 0.0, competition_sum_ = 0.0;
    std::vector<std::int64_t> active_rows_, dormant_rows_;  // cell counts per x level
    std::vector<std::int64_t> transfer_level_;  // L[l]: active cells at y level l
    std::int64_t transfer_pairs_ = 0;         // sum_{l<l'} L[l] L[l']
};

}  // namespace tessera
