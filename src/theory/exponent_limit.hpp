// The K -> infinity exponent limit of one patch (model.md section 7, docs/model.md "The
// exponent limit"): on the t / ln K scale every trait's exponent beta = log(1 + A + D) / ln K
// moves on straight lines. The whole algorithm, in the order predict_limit runs it:
//
//  1. Start (t / ln K = 0): a compartment (active or dormant cells of a trait) whose initial
//     count is at least resident_fraction * K_p is at exponent 1; any other starts at
//     log(1 + count) / ln K.
//  2. Settle (limit_settle.hpp): the deterministic limit of model.md section 5 (mutation off,
//     every mechanism, the patch's conditions now) is integrated from the compartments at 1 to
//     a stable equilibrium. Compartments left above extinct_density are the residents (at 1);
//     the others that were at 1 leave 1 from there.
//  3. Fitness (limit_fitness.hpp): the Jacobian of the non-resident compartments at that
//     equilibrium is a Metzler matrix; its strongly connected components are the classes that
//     feed each other at order one (a trait's active and dormant cells; with transfer_copies =
//     "transfer_only" several traits). Each class grows at the leading eigenvalue of its block
//     (two-type branching, Athreya & Ney 1972) and all its members share one exponent.
//  4. Sources (limit_sources.hpp) give each class a floor: beta >= beta_k for an order-one
//     edge from class k, beta_parent - alpha for a mutation parent (forward, and backward when
//     mutation_backward > 0), beta_recipient + beta_donor - 1 for a transfer product.
//  5. Motion (limit_motion.hpp), exact and event-driven: a class above its floor moves at its
//     growth rate, on its floor at max(growth, floor's slope); at 0 with no source above 0 it
//     is extinct. Next event: a class reaching 1, reaching 0 or meeting a floor, a schedule
//     boundary, run.until.
//     With no resident and frequency-dependent transfer, the compartments at the top exponent
//     are a dominant group: settled to a stable mix of the competition-free limit
//     (limit_settle.hpp settle_ray), growing along it; the others are linearised around the
//     mix; a class meeting the group's exponent joins it (the mix is settled again).
//  6. A class reaching 1 invades: back to 2 from the old equilibrium plus the invader at
//     invader_density. A schedule boundary (t / ln K units) re-settles under the new
//     conditions. Where the hypotheses fail (no equilibrium, a tie, a trait left at 1 that
//     does not decline) the prediction stops there, keeping what was computed.
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
    // The integration hands over to Newton's method (which reaches settle_tolerance, where an
    // explicit integrator's step-size control stalls near the rounding of its tolerances)
    // once no compartment above extinct_density changes faster than this, relative to its own
    // density per unit plain time. Relative: a growing invader at 1e-7 is not settled.
    double polish_from = 1e-6;
    // Plain time allowed to reach an equilibrium before the phase ends with no_equilibrium.
    double settle_time_max = 1e5;
    // A density below this after settling is zero: that trait is not resident.
    double extinct_density = 1e-8;
    // Two events closer than this (t / ln K) are a tie, where the theory does not say which
    // comes first.
    double tie_tolerance = 1e-9;
    // Step integration tolerances of the settling (Boost.Odeint dopri5, absolute in units of
    // K and relative): far below extinct_density, so no resident is lost to integration error.
    // The settled state is polished by Newton's method, so the integration only has to land
    // near the right equilibrium.
    double integration_abs_tolerance = 1e-12;
    double integration_rel_tolerance = 1e-8;
    // A density (units of K) above this while settling: the deterministic limit grows without
    // bound (e.g. a dormant pool that never dies, kappa = 0 with q = 1), no equilibrium.
    double density_max = 1e6;
    // Integration steps allowed per settling: a settled phase takes hundreds; a limit that
    // creeps towards no equilibrium (stiff from a growing pool, or algebraically slow) would
    // otherwise take hours of explicit steps to reach settle_time_max.
    std::size_t settle_steps_max = 200000;
    // Finite-difference step (units of K) of the non-resident Jacobian; with Richardson
    // extrapolation its error is O(step^2) ~ 1e-12 in a fitness.
    double jacobian_step = 1e-6;
    // Jacobian entries at or below this are no coupling (finite-difference rounding is far
    // smaller; a real order-one coupling is a rate times a density of order 1).
    double coupling_threshold = 1e-10;
    // A trait left at exponent 1 whose fitness is within this of 0 is neutral: the limit
    // cannot say whether it stays (the phase ends with tie).
    double neutral_fitness = 1e-9;
    // Exponents closer than this are equal (rounding of the event arithmetic, far below the
    // 1e-3 the limit is promised to).
    double contact_tolerance = 1e-12;
    // Events allowed before the prediction stops (guards against an endless cascade).
    std::size_t max_events = 1000000;
};

// How a phase of constant residents and conditions ended. `schedule`: the conditions changed
// at a [[schedule]] boundary (the residents re-settle; the set may stay the same).
enum class PhaseEnd { invasion, until, no_equilibrium, no_resident, tie, schedule };
// "invasion", "until", "no_equilibrium", "no_resident", "tie", "schedule"
const char* name_of(PhaseEnd end);

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
    // Invasion fitness of every trait during the phase (per unit plain time; the leading
    // eigenvalue of its class, the larger of its two compartments'); NaN for residents.
    std::vector<double> fitness;
};

struct LimitPrediction {
    std::vector<LimitPhase> phases;
    // The exponents are piecewise affine in t / ln K: their value for every trait at every
    // breakpoint ("knot"), knots non-decreasing from 0 to stopped_at. Two knots at the same
    // time are a jump (a class forming, a source taking effect at once): the later one holds.
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

// run.until and output.every of `scenario` in t / ln K.
double until_logK(const Scenario& scenario);
double output_every_logK(const Scenario& scenario);

// A sequence of resident sets that repeats: phases [first, first + length) have the same
// resident sets (as sets of traits) as the `length` phases after them, each of the same
// length in t / ln K (within `tolerance`); `period` is their total length in t / ln K.
struct ResidentCycle {
    std::size_t first_phase = 0;
    std::size_t length = 0;
    double period = 0.0;
    int repeats = 0;  // how many whole times the sequence repeats after its first occurrence
};
// The earliest such cycle that repeats at least `min_repeats` times, or nullopt. Only phases
// that ended by an invasion or a schedule boundary count (the last one is cut by run.until).
std::optional<ResidentCycle> find_cycle(const LimitPrediction& prediction, int min_repeats = 1,
                                        double tolerance = 1e-6);

}  // namespace tessera
