// The time loop. A run is a sequence of synchronisation steps of at most run.sync plain
// time units; every output time and every schedule switch is a step boundary. Each step:
//
//   1. local phase:       parallel over patches, each runs its own local events (exact);
//   2. emigration phase:  parallel over patches, each draws its leaving cells into its own
//                         outgoing buffer (binomial, then multinomial over neighbours);
//   3. immigration phase: parallel over patches, each adds what its neighbours sent, read
//                         in a fixed direction order.
//
// Random numbers are keyed by (seed, replicate, patch) and countered by (step, phase), so
// the result does not depend on the number of threads. With method = "exact-spatial" a step
// is instead one exact process over the whole lattice (next-subvolume method), serial. The engine knows nothing of files or
// windows: observers are handed a read-only engine at output times.
#pragma once

#include <atomic>
#include <cstdint>
#include <memory>
#include <vector>

#include "core/event_counts.hpp"
#include "core/habitat_timeline.hpp"
#include "core/lattice.hpp"
#include "core/lattice_partition.hpp"
#include "core/neighbourhood.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

class Engine;

// What is due at an output time (a bit set).
enum OutputKind : unsigned { series_output = 1, fields_output = 2, frames_output = 4 };

class Observer {
public:
    virtual ~Observer() = default;
    virtual void observe(const Engine& engine, unsigned kinds) = 0;
};

class Engine {
public:
    // `partition`: this engine is one process of a run split into bands of rows (below);
    // nullptr: a plain process, which steps and holds every row.
    Engine(const Scenario& scenario, std::uint32_t replicate = 0, LatticePartition* partition = nullptr);
    ~Engine();

    // Runs from the current time to run.until, handing the state to `observer` at t = 0 and
    // at every output time. Stops early (after a whole step, possibly between output times)
    // when `stop` becomes true; on return every output due at or before time() was handed out.
    // `resumed`: the engine was restored from a checkpoint, so the outputs due at or before
    // the current time were handed out by the run that wrote it and are not repeated.
    // Throws CellLimitError (core/count_limit.hpp), at a step boundary with the outputs due
    // so far handed out, rather than start a step that could carry a patch past 2^62 cells.
    void run(Observer& observer, const std::atomic<bool>* stop = nullptr, bool resumed = false);

    // Advances to plain time `t_end` in steps of at most run.sync; returns early, after a
    // whole step, when `stop` becomes true. Throws CellLimitError as run() does.
    void advance_to(double t_end, const std::atomic<bool>* stop = nullptr);

    const Scenario& scenario() const { return scenario_; }
    const TraitGrid& traits() const { return traits_; }
    const RateTable& rates() const { return rates_; }
    const Lattice& lattice() const { return lattice_; }
    Lattice& lattice() { return lattice_; }
    std::uint32_t replicate() const { return replicate_; }

    double time() const { return time_; }  // plain
    double time_logK() const;               // t / ln K
    double until() const;                   // plain end time of the run
    std::uint64_t step_number() const { return step_; }
    // Conditions of a patch's habitat class right now.
    const PatchConditions& conditions(std::size_t patch) const {
        return class_conditions_[scenario_.habitat_of_patch[patch]];
    }

    EventCounts totals() const;                     // summed over patches, in patch order
    std::uint64_t lost() const { return lost_; }    // through absorbing edges
    std::uint64_t migrants() const { return migrants_; }

    // --- checkpoints (src/io/checkpoint.*) ---------------------------------------------
    // Everything that carries over from one step to the next: with it and the scenario, a
    // restored engine continues bit for bit (random streams depend only on the step number;
    // the patch engines keep nothing between steps).
    struct State {
        double time = 0.0;  // plain
        std::uint64_t step = 0;
        std::vector<std::int64_t> active, dormant;  // [patch][trait]
        std::vector<EventCounts> patch_counts;
        std::uint64_t lost = 0, migrants = 0;
        std::vector<PatchConditions> class_conditions;
    };
    // The whole lattice's: on a plain process, or on process 0 of a split run once run()
    // returned (the other processes hold their band only: std::logic_error there).
    State state() const;
    // Throws std::invalid_argument (nothing changed) when the sizes do not fit this scenario.
    // A split run's processes each take their band's rows (a collective call).
    void restore(const State& state);
    // ------------------------------------------------------------------------------------

    // --- runs split over processes (core/lattice_partition.hpp) -------------------------
    // Given to the constructor, the partition makes this engine step only its band of rows
    // and agree with the other processes at every step. A process other than 0 holds the
    // counts, event counts and migrant boxes of its band only (and the boxes of the rows just
    // outside it); process 0 holds every patch's counts and event counts, gathered there at
    // every output time, every return from run() and every balance_every_steps steps, so
    // that its observers and state() see every patch. Every process of the partition must
    // make the same calls (the constructor, restore() and run() are collective). The
    // constructor throws std::invalid_argument for the exact-spatial method (serial by
    // nature) on more than one process, or for a lattice with fewer rows than processes.
    // Steps between two gathers of the state that rebalance the bands from the event counts
    // since the last one: often enough to follow a moving front, rare enough that the
    // gather of a large lattice costs little next to the steps.
    static constexpr std::uint64_t balance_every_steps = 64;
    // ------------------------------------------------------------------------------------

private:
    // "auto" leaps when a step holds many events (total rate * dt above this), exact
    // otherwise: below a few hundred events the exact engine costs no more than a leap's
    // Poisson draws, and it is exact. The leap engine itself still simulates small traits
    // event by event. Also the most a patch costs per step when cutting bands.
    static constexpr double auto_leap_events = 300.0;

    bool stop_agreed(const std::atomic<bool>* stop);  // the same answer on every process
    void share_state();                               // whole state on process 0, then rebalance
    void rebalance();                                 // new bands, and the rows moved to them
    void start_partition();                           // the first bands, from the counts held
    void move_band(RowBand old);                      // this band's rows to its new owner
    void release_step_buffers();                      // migrant boxes and books, until the next step
    static Lattice held_lattice(const Scenario& scenario, int traits, LatticePartition* partition);
    void step(double dt);
    void local_phase(double dt);
    void exact_spatial_step(double dt);
    void migration_phase(double dt);
#ifdef TESSERA_VALIDATE
    void validate_before_step(double t_next);  // docs/reliability.md "Validate mode"
    void validate_after_step();
#endif
    void inoculate();

    Scenario scenario_;
    TraitGrid traits_;
    RateTable rates_;
    Lattice lattice_;
    HabitatTimeline timeline_;
    Neighbourhood neighbourhood_;
    std::uint32_t replicate_;

    double time_ = 0.0;
    std::uint64_t step_ = 0;
    std::vector<PatchConditions> class_conditions_;
    std::vector<EventCounts> patch_counts_;
    std::uint64_t lost_ = 0;
    std::uint64_t migrants_ = 0;

    // The band this engine steps (every row without a partition), what it had when the
    // state was last shared, and the stop every process agreed on. patch_counts_ and
    // events_at_balance_ cover the lattice's held rows (lattice_.first_patch() onwards).
    LatticePartition* partition_ = nullptr;
    RowBand band_;
    std::uint64_t shared_step_ = 0;
    std::uint64_t lost_shared_ = 0, migrants_shared_ = 0;
    std::vector<std::uint64_t> events_at_balance_;  // per patch
    std::uint64_t balance_step_ = 0;
    bool stop_agreed_ = false;

    struct Scratch;
    std::unique_ptr<Scratch> scratch_;
};

}  // namespace tessera
