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
//
// Speed (docs/performance.md): a channel whose per-cell rate is the same for every trait
// (natural death and competition unless a rate override says otherwise) keeps no rate
// sums at all: its propensity is (rate) x (cells) and its cell is drawn by rank among the
// integer counts, which is exact and never drifts. Only channels with trait-dependent rates
// (division always) keep floating sums per row.
#pragma once

#include <cstdint>
#include <string>
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

    // Event by event, for the exact spatial engine, which keeps one ExactPatch per patch:
    // attach to a patch's counts (rebuilding every kept sum), read its total local rate,
    // fire one local event chosen with the right probabilities, and change counts from
    // outside (migration) with the kept sums following.
    void attach(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where);
    double total_rate() const;  // of the attached state; also for tests and the validate mode
    void fire(Rng& rng, EventCounts& counts);
    void add_active(int trait, std::int64_t delta);
    void add_dormant(int trait, std::int64_t delta);
    std::int64_t active_total() const { return active_total_; }
    std::int64_t dormant_total() const { return dormant_total_; }
    int active_cell(std::uint64_t rank) const;   // trait of the active cell of this rank
    int dormant_cell(std::uint64_t rank) const;  // trait of the dormant cell of this rank

    // Validate mode (docs/reliability.md): the kept sums of the attached state against a
    // recomputation from its counts. Integer sums must agree exactly, floating ones within
    // the rounding that incremental updates allow. Returns "" when they agree, else what
    // differs. O(traits); changes nothing.
    std::string check_kept_sums() const;

private:
    void recompute_sums();

    // The propensity of each channel in the loaded state.
    struct ChannelRates {
        double birth = 0, death = 0, competition = 0, conjugation = 0, dormant = 0, total = 0;
    };
    ChannelRates channel_rates() const;
    void execute(double u, const ChannelRates& r, Rng& rng, EventCounts& counts);

    int pick_by_rate(const double* row_sums, const double* rate, double u) const;
    int pick_cell(const std::int64_t* rows, const std::int64_t* counts, std::uint64_t r) const;
    int pick_in_column(int y_level, std::uint64_t r) const;
    void conjugate(Rng& rng);
    void divide(int parent, Rng& rng, EventCounts& counts);

    const TraitGrid& grid_;
    const RateTable& rates_;
    const double K_;
    const int nx_;
    const int ny_;

    // Per trait, copied from the rate table into one place for the hot loop.
    std::vector<int> x_of_, y_of_;            // trait -> x level, y level
    std::vector<std::uint64_t> q_threshold_;  // dormancy probability q as a 64-bit threshold
    std::uint64_t mu_threshold_ = 0;          // mutation probability as a 64-bit threshold
    // Natural death and competition rates when every trait has the same (else trait-wise).
    bool death_uniform_ = false, competition_uniform_ = false;
    double death_rate_ = 0.0, competition_rate_ = 0.0;

    // Loaded patch.
    std::int64_t* A_ = nullptr;
    std::int64_t* D_ = nullptr;
    double inv_Kp_ = 0.0;
    double stress_ = 0.0;
    double dormant_rate_ = 0.0;   // kappa + sigma * resuscitation factor
    double dormant_death_share_ = 0.0;
    double death_per_cell_ = 0.0;     // d + stress, when d is trait-independent
    double inv_death_cell_ = 0.0;     // 1 / death_per_cell_ (0 when that is 0)
    double competition_scale_ = 0.0;  // (C when trait-independent, else 1) / K_p
    double transfer_density_ = 0.0;   // tau / K_p
    bool frequency_ = true;           // transfer_form == frequency
    bool count_dormant_ = false;      // competition_counts_dormant

    // Sums kept up to date event by event. The death and competition sums are kept only
    // when that rate depends on the trait.
    std::int64_t active_total_ = 0;
    std::int64_t dormant_total_ = 0;
    std::vector<double> birth_rows_, death_rows_, competition_rows_;  // per x level
    double birth_sum_ = 0.0, death_sum_ = 0.0, competition_sum_ = 0.0;
    std::vector<std::int64_t> active_rows_, dormant_rows_;  // cell counts per x level
    std::vector<std::int64_t> transfer_level_;  // L[l]: active cells at y level l
    // sum_{l<l'} L[l] L[l'], in 128 bits: two levels of 3.1e9 cells each already make more
    // pairs than an int64 holds (counts go up to 2^62).
    uint128 transfer_pairs_ = 0;
};

}  // namespace tessera
