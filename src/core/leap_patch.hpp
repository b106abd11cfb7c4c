// The leap engine for one patch: explicit Poisson tau-leaping with the step-size selection
// of Cao, Gillespie & Petzold (2006), "Efficient step size selection for the tau-leaping
// simulation method", J. Chem. Phys. 124:044109, and the exact treatment of critical
// channels of Cao, Gillespie & Petzold (2005), "Avoiding negative populations in explicit
// Poisson tau-leaping", J. Chem. Phys. 122:054103.
//
// Channels (model.md section 2), each consuming at most one cell and producing at most one:
//   per trait i: division without mutation, division into each mutation target (Poisson
//   thinning of the births, so the split by mu, the backward probability and the edge rules
//   costs no binomial draw), natural death (+ stress), competition death, competition into
//   dormancy (q_i), dormant death, resuscitation;
//   per recipient trait j and donor transfer level l > y_j: conjugation, rate
//   tau/Na * A_j * L_l (or tau/K_p), so a leap costs O(T * y_levels), never O(T^2). With
//   transfer_copies = "whole" the donor trait inside level l is drawn by one multinomial of
//   all that level's conjugations over its column (a sum of multinomials with the same cell
//   probabilities is a multinomial); with "transfer_only" the target is (x_j, l) directly.
//
// A channel is critical when the cells it acts on (the dividing, dying, converting or
// receiving trait) number fewer than n_c. Critical channels fire at most once per leap, as
// the next event of an exact simulation (CGP 2005, step 4), so a trait with 3 cells is
// still born, mutates and dies one cell at a time; the others fire Poisson numbers of times.
// A leap that would make any count negative is rejected and retried with half the step. When
// the step allowed falls below a few mean waiting times (tau < exact_below / a0), or no
// channel is non-critical, a short stretch of exact simulation (ExactPatch) runs instead, as
// CGP 2006 (section IV) recommend.
#pragma once

#include <cstdint>
#include <vector>

#include "core/event_counts.hpp"
#include "core/exact_patch.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

struct LeapSettings {
    double epsilon = 0.03;             // CGP 2006 error control: relative change of propensities
    std::int64_t critical_cells = 10;  // n_c of CGP 2005
    double exact_below = 10.0;         // SSA instead when tau < exact_below / a0 (CGP 2006)
    double exact_events = 100.0;       // expected events of one such SSA stretch
};

// What the engine did (for tests, benchmarks and docs/performance.md).
struct LeapStats {
    std::uint64_t leaps = 0;             // accepted leaps
    std::uint64_t rejected = 0;          // leaps retried because a count would go negative
    std::uint64_t critical_firings = 0;  // leaps that fired one critical channel
    std::uint64_t exact_stretches = 0;   // hand-overs to ExactPatch
    std::uint64_t exact_events = 0;      // events those stretches simulated
};

class LeapPatch {
public:
    LeapPatch(const TraitGrid& grid, const RateTable& rates, double K, LeapSettings settings = {});

    // The contract of ExactPatch::advance: runs the local events of one patch for `duration`
    // units of plain time, updating `active` and `dormant` (one count per trait) in place,
    // and tallies events into `counts`. Counts never become negative. Returns the number of
    // events (every Poisson firing counts its multiplicity).
    std::uint64_t advance(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where,
                          double duration, Rng& rng, EventCounts& counts);

    // The total event rate a0 of a patch's state, in O(traits) (for the engine's "auto").
    double total_rate(const std::int64_t* active, const std::int64_t* dormant,
                      const PatchConditions& where) const;

    const LeapStats& stats() const { return stats_; }
    void reset_stats() { stats_ = {}; }
    const LeapSettings& settings() const { return settings_; }

private:
    enum class Kind : std::uint8_t {
        birth, mutant_birth, death, competition_death, dormancy, dormant_death, resuscitation,
        conjugation
    };
    // One channel in the current state. Indices are into the species vector x_
    // ([A_0..A_{T-1}, D_0..D_{T-1}]); produce < 0 on a "whole" conjugation means "a donor
    // trait of level `level`, drawn in proportion to the active cells there".
    struct Channel {
        double rate;
        std::int32_t reactant;  // the cells the channel acts on (decides criticality)
        std::int32_t consume;   // -1: none
        std::int32_t produce;   // -1: none (or a whole-copy donor draw, see above)
        std::int32_t level;     // donor transfer level of a conjugation
        Kind kind;
        bool critical;
    };

    void build_channels();
    double step_size();  // tau' of CGP 2006 from the non-critical channels
    // Fires non-critical channels Poisson(a tau) times and channel `fire` (if >= 0) once,
    // into trial_; false when some count would go negative (nothing is changed then).
    bool try_leap(double tau, int fire, Rng& rng, EventCounts& tally);
    void tally(Kind kind, std::int64_t k, EventCounts& c) const;

    const TraitGrid& grid_;
    const RateTable& rates_;
    const double K_;
    const LeapSettings settings_;
    const int T_;
    const int nx_;
    const int ny_;
    ExactPatch exact_;

    // Per trait: mutation targets with the probability of each (thinning of births).
    struct Mutant {
        int trait;
        double probability;
    };
    std::vector<std::vector<Mutant>> mutants_;
    std::vector<double> self_share_;  // 1 - sum of the mutant probabilities
    double g_active_ = 2.0;           // highest order in which an active count enters a rate
    double g_dormant_ = 1.0;

    // Loaded patch and work space.
    double inv_Kp_ = 0.0, stress_ = 0.0, resus_ = 0.0;
    std::vector<std::int64_t> x_, trial_;
    std::vector<std::int64_t> level_cells_;     // L_l: active cells at transfer level l
    std::vector<std::int64_t> level_gains_;     // whole-copy conjugations won by level l
    std::vector<double> level_rate_;            // non-critical whole-copy rate into level l
    std::vector<Channel> channels_;
    std::vector<double> drift_, variance_;      // mu_k and sigma_k^2 of CGP 2006
    std::vector<std::uint8_t> reactant_;        // species k is a reactant of a non-critical channel
    std::vector<double> eps_over_g_;            // eps / g_k per species
    double a0_ = 0.0, critical_rate_ = 0.0;
    bool any_noncritical_ = false;
    LeapStats stats_;
};

}  // namespace tessera
