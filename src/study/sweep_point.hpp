// One point of a sweep: its limit prediction and its stochastic replicates, each classified
// (study/regime.hpp), and the per-point summary over replicates. No I/O: src/io formats the
// rows and src/cli writes them.
//
// Random streams: replicate r of point i runs the point's scenario with
//   run.seed = point_seed(base, i)   and Engine replicate r,
// base being --seed or the point's own run.seed. The engine keys its streams by (seed,
// replicate, patch) (core/rng.hpp), so replicate r of point i never depends on how many
// points or replicates a sweep has, nor on the shard or thread that runs it.
#pragma once

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/engine.hpp"
#include "study/regime.hpp"
#include "study/wilson_interval.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

// The mix of (base seed, point index): SplitMix64's finaliser (Steele, Lea & Flood 2014,
// "Fast splittable pseudorandom number generators", OOPSLA) of base + (i + 1) * golden
// gamma, so neighbouring points get unrelated seeds and point 0 does not reuse `base`.
std::uint64_t point_seed(std::uint64_t base, std::size_t point);

// P: the capacity-weighted number of habitable patches (sum of the patches' capacities at
// t = 0), so that exponent_per_patch = log(1 + N / P) / log K is 1 at carrying capacity
// everywhere (interfaces.md). Runs are classified on this exponent, so a lattice and a
// single patch read on one scale.
double habitable_patches(const Scenario& scenario);

// "x:y" per trait, in trait order, the coordinates as the series files write them.
std::vector<std::string> trait_names(const TraitGrid& traits);

struct PointResult {
    Outcome outcome;
    std::vector<double> final_exponents;  // per trait, at the end
};

// Records the per-patch exponents at every series output time, and hands every output on
// to `next` (if any), e.g. a writer of the full series.
class ExponentRecorder : public Observer {
public:
    ExponentRecorder(double patches, Observer* next) : patches_(patches), next_(next) {}
    void observe(const Engine& engine, unsigned kinds) override;
    const ExponentSeries& series() const { return series_; }

private:
    double patches_;
    Observer* next_;
    ExponentSeries series_;
};

// Runs replicate `replicate` of `scenario` (its run.seed already the point's seed) to its
// end and classifies it; nullopt when `stop` became true before the end.
std::optional<PointResult> run_replicate(const Scenario& scenario, int replicate, const RegimeSettings& regimes,
                                         const std::atomic<bool>* stop = nullptr, Observer* extra = nullptr);

// The limit of `scenario` (limit_not_applicable must be nullopt), classified; the final
// exponents are the limit's at stopped_at.
PointResult limit_point(const Scenario& scenario, const RegimeSettings& regimes, const LimitSettings& limit = {});

struct SummaryRow {
    std::string kind;  // "regime" or "resident"
    std::string name;  // regime name, or trait "x:y"
    long count = 0;
    long replicates = 0;
    double fraction = 0.0;
    WilsonInterval interval;
};

// Per point and source: one row per regime (all four, in the order of all_regimes) and one
// per trait (in trait order): the fraction of `outcomes` in that regime, or whose residents
// include that trait, with its Wilson 95 % interval.
std::vector<SummaryRow> summarize_outcomes(const std::vector<Outcome>& outcomes,
                                           const std::vector<std::string>& trait_names);

}  // namespace tessera
