// The most cells a patch may hold, and the guard that stops a run before a patch could pass
// it (docs/reliability.md "Runs that outgrow the counts").
//
// Counts are signed 64-bit. Below 2^62 cells per patch (active and dormant, every trait
// together) every per-patch sum the engines form, and every intermediate count of a step,
// stays far from 2^63; the loader refuses inocula past it (src/io/scenario_check.cpp,
// scenario_read.cpp) and the engine never starts a step that could carry a patch past it.
//
// Why before the step: a step is one indivisible piece of work (its random numbers depend on
// the step number only), and the patch engines cannot be stopped inside one. Counts that
// reach 2^63 wrap; before that, near 2^63, every leap of the leap engine "would make a count
// negative" and is halved down to exact stretches of ~1e-18 time units each, so the step
// never ends and neither Ctrl-C nor the loop's own stop can end it.
//
// The bound: only a division adds a cell to a patch, at per-cell rate at most b_max (the
// largest birth rate of any trait), and immigration at most m * permeability per cell of the
// neighbours (m the larger migration rate, permeability the largest any habitat or
// schedule gives). So over a step of length dt the largest patch total M grows at most like
// a pure birth (Yule) process of rate lambda = b_max + m * permeability, to
// e^(lambda dt) (M (1 + 1e-6) + 20 sqrt(M) + 100) except with probability below e^-100 (20
// standard deviations for large M, the gamma tail of the Yule process for small M).
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>

namespace tessera {

class Engine;

// 2^62 cells in one patch.
inline constexpr std::int64_t cell_limit = std::int64_t{1} << 62;
// The same as a double (exact: a power of two), for values read as numbers.
inline constexpr double cell_limit_real = static_cast<double>(cell_limit);

// A run stopped because a patch could pass cell_limit within the next step. The engine
// is left at the start of that step, a step boundary with every patch below the limit:
// its state() can be checkpointed and its outputs up to time() are complete. what() names
// the scenario file, the time, the patch, its largest trait, the limit and the remedy.
class CellLimitError : public std::runtime_error {
public:
    CellLimitError(const std::string& message, double time, std::size_t patch, int trait)
        : std::runtime_error(message), time_(time), patch_(patch), trait_(trait) {}
    double time() const { return time_; }  // plain
    std::size_t patch() const { return patch_; }
    int trait() const { return trait_; }

private:
    double time_;
    std::size_t patch_;
    int trait_;
};

// The end of the engine's next step, planned to end at plain time t_next: t_next itself
// when no patch can pass cell_limit before it; an earlier time (a step of at most 10%
// growth) when the planned step is long enough to carry a patch past the limit but that
// shorter one is not; else throws CellLimitError. O(patches x traits): one scan of counts.
double limit_step(const Engine& engine, double t_next);

// The two halves of limit_step, for a lattice split over processes (core/lattice_partition.hpp),
// where each process scans its own patches and they agree on the largest total first:
// the most cells (active and dormant) any patch in [first, end) holds, as a double;
double largest_patch_total(const Engine& engine, std::size_t first, std::size_t end);
// and the end of the next step given that largest total: t_next or a shorter step as
// limit_step gives, or nothing when limit_step would throw.
std::optional<double> step_end_below_limit(const Engine& engine, double t_next, double most);

}  // namespace tessera
