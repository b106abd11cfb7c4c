// The leap engine for one patch: Poisson tau-leaping of the channels of large traits with
// the step-size selection of Cao, Gillespie & Petzold (2006), "Efficient step size selection
// for the tau-leaping simulation method", J. Chem. Phys. 124:044109, and Gillespie's
// estimated-midpoint rates (Gillespie 2001, J. Chem. Phys. 115:1716), whose bias is O(tau^2)
// where the explicit leap's is O(tau) (Anderson, Ganguly & Kurtz 2011, Ann. Appl. Probab.
// 21:2226); and an exact simulation, across each whole leap, of the channels of small
// traits: the partition into slow reactions simulated exactly and fast ones leaped of
// Puchalka & Kierzek (2004), "Bridging the gap between stochastic and deterministic regimes
// in the kinetic simulations of the biochemical reaction networks", Biophys. J. 86:1357. It
// generalises the critical channels of Cao, Gillespie & Petzold (2005), "Avoiding negative
// populations in explicit Poisson tau-leaping", J. Chem. Phys. 122:054103: there a critical
// channel fires at most once per leap and cuts the leap short; here it fires as often as an
// exact simulation says, so small traits no longer shorten the leaps of the large ones.
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
// A trait with fewer than `critical_cells` cells is small; so is a donor level with fewer.
// The channels of a small trait, and the conjugations into a small donor level, are exact:
// over a leap of length tau they run as a direct-method simulation whose rates follow the
// small counts as they change (the patch totals are held at the leap's midpoint, as for the
// leaped channels), so a trait of 3 or 150 cells is born, mutates, converts and dies one cell
// at a time and can never go negative. Cells that the leaped channels place in a small trait
// (mutants, dormant cells, conjugation recipients) arrive at uniform times inside the leap,
// so they start dividing and dying at once. The other channels fire Poisson numbers of times
// at their midpoint rates. tau bounds, by CGP 2006's rule, the relative change of every count
// a leaped rate is proportional to: the large traits, their donor levels and the patch's
// active total. A leap that would make a large trait negative is rejected and retried with
// half the step (CGP 2005). When the step allowed falls below a few mean waiting times
// (tau < exact_below / a0), or no channel is leaped, a short stretch of exact simulation
// (ExactPatch) runs instead, as CGP 2006 (section IV) recommend.
#pragma once

#include <cstdint>
#include <utility>
#include <vector>

#include "core/event_counts.hpp"
#include "core/exact_patch.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

struct LeapSettings {
    // CGP 2006 error control: the relative change of the rates allowed in one leap. CGP use
    // 0.03 for the explicit leap; with midpoint rates (O(tau^2) bias) 0.1 is as accurate by
    // V11 and by a leap-vs-exact comparison at K = 1e6 (docs/performance.md), where 0.2 is
    // not.
    double epsilon = 0.1;
    // Traits with fewer cells are simulated exactly inside each leap. CGP 2005 use n_c = 10;
    // a larger threshold takes the traits of tens to hundreds of cells out of the step-size
    // bound, where CGP 2006's relative-change condition made them the binding ones
    // (docs/performance.md, "Large populations"), at the price of their own exact events.
    std::int64_t critical_cells = 200;
    double exact_below = 10.0;         // SSA instead when tau < exact_below / a0 (CGP 2006)
    double exact_events = 100.0;       // expected events of one such SSA stretch
    double exact_per_leap = 1000.0;    // at most about this many exact events inside one leap
    // A small species whose cells leave (die, convert, go dormant) at a per-cell rate delta
    // with delta * tau >= fast_turnover in a leap is "fast": its end-of-leap state is drawn
    // from the immigration-death law in O(1) draws instead of simulated event by event
    // (docs/model.md section 3). At 50, a cell present at the start survives the leap with
    // probability e^-50, and the law is the stationary one to within that.
    double fast_turnover = 50.0;
    // ... as long as its cells divide rarely before they leave (birth <= this x delta): the
    // law draws their few births as a Poisson number over the expected cell time, which is
    // exact only as birth / delta -> 0.
    double fast_birth_ratio = 1e-2;
};

// What the engine did (for tests, benchmarks and docs/performance.md).
struct LeapStats {
    std::uint64_t leaps = 0;             // accepted leaps
    std::uint64_t rejected = 0;          // leaps retried because a count would go negative
    std::uint64_t critical_events = 0;   // exact events of critical channels inside leaps
    std::uint64_t exact_stretches = 0;   // hand-overs to ExactPatch
    std::uint64_t exact_events = 0;      // events those stretches simulated
    std::uint64_t fast_resolutions = 0;  // fast species drawn from the immigration-death law
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
    // A leaped channel in the current state. Indices are into the species vector x_
    // ([A_0..A_{T-1}, D_0..D_{T-1}]); produce < 0 on a "whole" conjugation means "a donor
    // trait of level `level`, drawn in proportion to the active cells there".
    struct Channel {
        double rate;
        double per_cell;        // at the leap's start (the midpoint keeps it where it is constant)
        std::int32_t reactant;  // the cells the channel acts on
        std::int32_t consume;   // -1: none (else the reactant)
        std::int32_t produce;   // -1: none (or a whole-copy donor draw, see above)
        std::int32_t level;     // donor transfer level of a conjugation
        Kind kind;
    };
    // A species with critical channels, simulated exactly inside the leap. A small species
    // (fewer than critical_cells, empty ones included, so that offspring arriving during the
    // leap divide and die at once) has all its channels critical; a large active one only
    // its conjugations into donor levels with few cells (crit_level_), whose rates move
    // with those few donors.
    struct ExactEntry {
        std::int32_t species;
        std::int32_t level;  // its transfer level (active), -1 (dormant)
        bool small;
        double own_rate;     // per cell, the channels other than conjugation (small only)
        double leave_rate = 0.0;  // per cell, every channel that consumes the cell (small only)
        bool fast = false;        // this leap draws it from the immigration-death law
    };
    // A cell that a leaped channel places in a small species, at a uniform time of the leap.
    struct Arrival {
        double time;
        std::int32_t species;
        bool operator<(const Arrival& o) const { return time < o.time; }
    };

    // The channels of the state x_ (which exist, which are leaped, which exact), with rates
    // taken at the state at_: x_ itself, or the leap's estimated midpoint (set_midpoint).
    void build_channels();
    void take_totals();
    double own_rate(int species) const;
    // Calls f(per_cell, consumes, produce, level, kind) for each channel of species k: its
    // own channels if `own`, and its conjugations into the levels l with level_mask[l],
    // whose rate per cell is conj_factor_ * L[l].
    template <class F>
    void channels_of(int k, bool own, const std::uint8_t* level_mask, const double* L, F&& f) const;
    // Gillespie's estimated midpoint: at_ = x_ + (tau / 2) * mu, then the rates there.
    void set_midpoint(double tau);
    double step_size();  // tau' of CGP 2006
    // Fires the leaped channels Poisson(a tau) times and runs the exact channels over
    // [0, tau), into trial_; false when some count would go negative (nothing is changed).
    bool try_leap(double tau, Rng& rng, EventCounts& tally, std::uint64_t& exact_events);
    void add_cells(int species, std::int64_t n, double tau, Rng& rng);  // now, or as arrivals
    std::uint64_t simulate_exact(double tau, Rng& rng, EventCounts& tally);
    double entry_cells(const ExactEntry& e) const;
    const std::uint8_t* entry_levels(const ExactEntry& e) const;
    double exact_rate(const ExactEntry& e) const;  // in the live state
    void refresh_level_sums();
    void refresh_after_change(int species);
    void refresh_all_rates();
    void change(int species, std::int64_t by);     // trial_ and live_level_ together
    int donor_of_level(int level, Rng& rng) const;
    // Fast small species (LeapSettings::fast_turnover): their per-cell leave rate at at_, the
    // choice for a leap of length tau, and their end-of-leap states (leap_fast_species.cpp).
    double leave_rate(int species) const;
    bool may_be_fast(const ExactEntry& e) const;
    void choose_fast(double tau);
    bool is_fast(int species) const { return fast_.empty() ? false : fast_[species] != 0; }
    void resolve_fast(double tau, Rng& rng, EventCounts& tally);
    std::int64_t add_products(int produce, int level, Kind kind, std::int64_t n, Rng& rng);
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
    std::vector<double> at_;                    // the state the rates are taken at
    std::vector<double> level_at_;              // L_l of at_
    std::vector<std::int64_t> level_cells_;     // L_l: active cells at transfer level l
    std::vector<std::int64_t> level_gains_;     // whole-copy conjugations won by level l
    std::vector<double> level_rate_;            // non-critical whole-copy rate into level l
    std::vector<Channel> channels_;
    std::vector<ExactEntry> exact_entries_;
    std::vector<double> competition_;           // per cell competition rate of each trait (at at_)
    double conj_factor_ = 0.0;                  // conjugation rate per recipient and donor cell
    std::vector<std::uint8_t> all_levels_;      // mask: every level
    std::vector<std::uint8_t> crit_level_;      // mask: donor levels with few cells
    std::vector<std::int32_t> entry_of_;        // species -> its exact entry, or -1
    std::vector<Arrival> arrivals_;
    std::vector<std::pair<std::int32_t, std::int64_t>> late_;  // floods into small species
    std::vector<std::uint8_t> fast_;            // species -> 0, pending_fast or drawn_fast (empty: none fast)
    static constexpr std::uint8_t pending_fast = 1, drawn_fast = 2;
    std::vector<std::pair<double, double>> fast_candidates_;  // step_size: (leave rate, exact rate)
    std::vector<std::int64_t> fast_arrivals_;   // cells placed in a fast species at uniform times
    std::vector<double> fast_exposure_;         // sum of (1 - e^{-delta (tau - t)}) over timed arrivals
    std::vector<std::int64_t> fast_timed_;      // cells placed in it at known times (exact part)
    std::vector<std::int64_t> fast_timed_alive_; // of those, survivors drawn one by one
    struct Leaver {                             // a consuming channel of a fast species
        double per_cell;
        int produce, level;
        Kind kind;
    };
    std::vector<Leaver> leavers_;
    std::vector<double> entry_rate_;            // work space of simulate_exact
    double exact_total_ = 0.0;                  // their sum
    std::vector<double> live_level_;            // L_l during simulate_exact
    std::vector<double> live_above_all_, live_above_crit_;  // sums of live_level_ above l
    std::vector<std::uint8_t> level_bounded_;   // L_l drives a leaped conjugation
    std::vector<double> drift_, variance_;      // mu_k and sigma_k^2 of CGP 2006
    std::vector<std::uint8_t> reactant_;        // species k is a reactant of a non-critical channel
    std::vector<double> eps_over_g_;            // eps / g_k per species
    double a0_ = 0.0;
    LeapStats stats_;
};

}  // namespace tessera
