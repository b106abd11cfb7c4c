// Regime classification: what a limit prediction or a stochastic replicate ends in.
//
//   extinct      no cells at the end;
//   resident     one leading trait at the end;
//   coexistence  two or more leading traits at the end, the set not cycling;
//   cycling      the set of leading traits changes and comes back to a set it had before
//                at least `min_returns` times in the final window (runs), or the limit's
//                resident sets repeat (find_cycle, theory/exponent_limit.hpp).
//
// A trait leads at a time when its exponent is within `eps` of the reference level
// min(1, top exponent at that time); it keeps leading until it falls `hysteresis` further.
// The rule, its thresholds and why they are what they are: docs/model.md "Regimes".
// No I/O.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "theory/exponent_limit.hpp"

namespace tessera {

enum class Regime { extinct, resident, coexistence, cycling };
inline constexpr Regime all_regimes[] = {Regime::extinct, Regime::resident, Regime::coexistence, Regime::cycling};
const char* name_of(Regime regime);  // "extinct", "resident", "coexistence", "cycling"

struct RegimeSettings {
    // A trait within eps of the reference level (exponent 1, or the top trait's exponent when
    // no trait reaches 1) leads. At finite K a trait at a fraction c of K sits at exponent
    // 1 + ln c / ln K: eps = 0.1 takes c >= 0.4 at K = 1e4 and c >= 0.25 at K = 1e6, and
    // keeps out a mutation-fed trait at K^(1 - alpha) for any alpha > 0.1.
    double eps = 0.1;
    // A leading trait stops leading only below reference - eps - hysteresis, so that noise
    // around the threshold is not read as a change of the leading set (Poisson noise of N
    // cells moves the exponent by about 1 / (sqrt(N) ln K), 0.003 for N = 1e3 at K = 1e4).
    double hysteresis = 0.02;
    // The final window of a run, as a fraction of its output time span (ending at its end).
    double final_window = 0.25;
    // Returns to an earlier leading set in the final window that make a run cycling.
    int min_returns = 2;
    // Whole repeats of the limit's resident sequence that make it cycling (find_cycle).
    int limit_min_repeats = 1;
};

struct Outcome {
    Regime regime = Regime::extinct;
    std::vector<int> residents;   // trait indices, in trait order (cycling: every trait that leads in it)
    std::optional<double> period; // t / ln K; cycling only
    double final_t_logK = 0.0;
};

// A run's exponents at its output times: exponents[k][trait] at t_logK[k] (times increasing).
struct ExponentSeries {
    std::vector<double> t_logK;
    std::vector<std::vector<double>> exponents;
};

// Classifies a run from its series. An empty series is extinct at t = 0.
Outcome classify_series(const ExponentSeries& series, const RegimeSettings& settings = {});

// Classifies a limit prediction from its phases: cycling when find_cycle finds a repeating
// sequence of at least two different resident sets; otherwise the residents of the last
// phase; when that phase has none, extinct if every exponent at the end is 0, else the
// traits within eps of the top exponent (a population below the resident level).
Outcome classify_limit(const LimitPrediction& prediction, const RegimeSettings& settings = {});

// "x:y" of each trait joined by ';' in trait order, the trait coordinates written as the
// series files write them (shortest text that reads back).
std::string residents_text(const std::vector<int>& residents, const std::vector<std::string>& trait_names);

}  // namespace tessera
