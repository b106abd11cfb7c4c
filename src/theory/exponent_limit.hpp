// The K -> infinity exponent limit of one patch (model.md section 7, docs/model.md): on the
// t / ln K scale every trait's exponent beta = log(1 + A + D) / ln K moves on straight lines.
// Residents (beta = 1) sit at a stable equilibrium of the deterministic limit; every other
// trait moves at its invasion fitness, pulled up by its sources (mutation: beta_parent -
// alpha; order-one transfer products: beta of the partner); a trait reaching 1 changes the
// resident set, found by integrating the deterministic limit from the old equilibrium plus
// the invader.
//
// This header is the whole interface: `tessera predict --model limit`, `tessera run` (the
// limit_series.csv beside a one-patch run) and sweeps (src/study) call only what is here.
// No I/O: src/io writes the results.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "core/scenario.hpp"

namespace tessera {

// Numerical settings of the limit; each is a named tolerance with a reason (docs/model.md).
struct LimitSettings {
    // An initial count of at least this fraction of K_p puts a trait at exponent 1 (a count
    // of order K is at exponent 1 in the limit, whatever its O(1) factor).
    double resident_fraction = 1e-3;
    // Density (units of K) given to an invader when it reaches 1, before the deterministic
    // limit is integrated to the new equilibrium.
    double invader_density = 1e-6;
    // The deterministic limit is at equilibrium when no density changes faster than this
    // (per unit plain time, densities in units of K).
    double settle_tolerance = 1e-11;
    // Plain time allowed to reach an equilibrium before the phase ends with no_equilibrium.
    double settle_time_max = 1e5;
    // A density below this after settling is zero: that trait is not resident.
    double extinct_density = 1e-8;
    // Two events closer than this (t / ln K) are a tie, where the theory does not say which
    // comes first.
    double tie_tolerance = 1e-9;
};

// How a phase of constant residents ended.
enum class PhaseEnd { invasion, until, no_equilibrium, no_resident, tie };
const char* name_of(PhaseEnd end);  // "invasion", "until", "no_equilibrium", "no_resident", "tie"

struct ResidentState {
    int trait = 0;                // index in the fixed trait order (core/trait_grid.hpp)
    double active_density = 0.0;  // A / K at the equilibrium
    double dormant_density = 0.0; // D / K
};

struct LimitPhase {
    double start_t_logK = 0.0;
    double end_t_logK = 0.0;
    PhaseEnd end = PhaseEnd::until;
    std::vector<ResidentState> residents;  // in trait order; empty: no trait at exponent 1
    std::vector<int> invaders;             // traits that reached 1 at end_t_logK (end = invasion)
};

struct LimitPrediction {
    std::vector<LimitPhase> phases;
    // The exponents are piecewise affine in t / ln K: their value for every trait at every
    // breakpoint ("knot"), knots increasing from 0 to stopped_at.
    std::vector<double> knot_t_logK;
    std::vector<std::vector<double>> knot_exponents;  // [knot][trait]
    double stopped_at = 0.0;   // t / ln K where the prediction ends (run.until unless it stopped)
    std::string stop_reason;   // "" when it reached run.until; else what failed, naming the time

    // Exponent of `trait` at t / ln K `s` (interpolated between knots); NaN past stopped_at.
    double exponent_at(int trait, double s) const;
};

// Why the limit does not apply to `scenario` (more than one patch, schedule times in plain
// time, ...), or nullopt when it does. The text names the scenario key at fault.
std::optional<std::string> limit_not_applicable(const Scenario& scenario);

// The limit from t / ln K = 0 to the scenario's run.until (converted to t / ln K when
// run.time_unit is plain). Precondition: limit_not_applicable(scenario) is nullopt.
LimitPrediction predict_limit(const Scenario& scenario, const LimitSettings& settings = {});

// A sequence of resident sets that repeats: phases [first, first + length) have the same
// resident sets (as sets of traits) as the `length` phases after them; `period` is their
// total length in t / ln K.
struct ResidentCycle {
    std::size_t first_phase = 0;
    std::size_t length = 0;
    double period = 0.0;
    int repeats = 0;  // how many whole times the sequence repeats after its first occurrence
};
// The earliest such cycle that repeats at least `min_repeats` times, or nullopt.
std::optional<ResidentCycle> find_cycle(const LimitPrediction& prediction, int min_repeats = 1);

}  // namespace tessera
