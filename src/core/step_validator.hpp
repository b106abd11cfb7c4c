// Validate mode (CMake option TESSERA_VALIDATE, docs/reliability.md): after every step of the
// engine, check that
//   - no count is negative;
//   - the books balance over the step, per patch and in total:
//       before + born + immigrated - died - emigrated - lost = after
//     (dormancy, resuscitation, conjugation and mutation move cells within a patch);
//   - the exact engine's kept propensity sums equal a recomputation from scratch.
// Over a run the per-step books add up to initial + born + immigrated - died - emigrated -
// lost = now, and a step that breaks them is named at once.
//
// A failure throws ValidationFailure (an internal fault: the program exits 1) whose message
// names the seed, replicate, patch and step, and how to re-run just that step: with
// TESSERA_STOP_AFTER_STEP=N in the environment a validate build runs to the end of step N,
// checking every step, and stops there.
#pragma once

#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/event_counts.hpp"
#include "core/lattice.hpp"

namespace tessera {

class ValidationFailure : public std::logic_error {
public:
    using std::logic_error::logic_error;
};

// What the migration phase of one step moved, per patch (empty when no migration phase ran).
struct MigrationBooks {
    const std::vector<std::uint64_t>* emigrated = nullptr;  // sent to another patch
    const std::vector<std::uint64_t>* immigrated = nullptr; // received from other patches
    const std::vector<std::uint64_t>* lost = nullptr;       // through an absorbing edge
};

class StepValidator {
public:
    // `scenario_file` is the scenario's path, for the re-run recipe in messages.
    StepValidator(std::string scenario_file, std::uint64_t seed, std::uint32_t replicate);

    // Before step number `step` (from 0) covering plain time [t0, t1): remembers every
    // patch's population and event tallies.
    void before(const Lattice& lattice, const std::vector<EventCounts>& counts, std::uint64_t lost,
                std::uint64_t step, double t0, double t1);

    // After the step. `migration` holds the step's per-patch migrations, or null when the
    // step moved no cells between patches, or when it moved them but kept no per-patch books
    // (the exact spatial engine): then only the lattice totals are balanced, with
    // `lost_total` the engine's running count of cells lost at absorbing edges.
    void after(const Lattice& lattice, const std::vector<EventCounts>& counts, std::uint64_t lost_total,
               const MigrationBooks* migration, bool per_patch_books);

    // A kept-sum check's finding for `patch` in the current step ("" passes).
    void kept_sums(const std::string& problem, std::size_t patch, int width) const;

    // True when TESSERA_STOP_AFTER_STEP asks to stop after the step just checked.
    bool stop_now() const { return stop_after_ && step_ >= *stop_after_; }

private:
    [[noreturn]] void fail(std::optional<std::size_t> patch, int width, const std::string& what) const;

    std::string scenario_file_;
    std::uint64_t seed_;
    std::uint32_t replicate_;
    std::optional<std::uint64_t> stop_after_;

    std::uint64_t step_ = 0;
    double t0_ = 0.0, t1_ = 0.0;
    std::uint64_t lost_before_ = 0;
    std::vector<std::int64_t> population_before_;
    std::vector<EventCounts> counts_before_;
};

}  // namespace tessera
