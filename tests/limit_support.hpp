// Shared pieces of the exponent-limit tests: small one-patch scenarios in t / ln K.
#pragma once

#include <cmath>
#include <limits>

#include "core/scenario.hpp"
#include "core/trait_grid.hpp"
#include "theory/exponent_limit.hpp"
#include "validation_support.hpp"

namespace tessera::limittest {

// One patch, time in t / ln K, nothing switched on (validation::one_patch_scenario) and a
// large K, so that a count K^beta has exponent log(1 + K^beta) / ln K = beta + O(K^-beta / ln K).
inline Scenario scenario(double K = 1e30) {
    Scenario s = validation::one_patch_scenario();
    s.K = K;
    s.time_unit = TimeUnit::logK;
    s.until = 3.0;
    s.output_every = 0.1;
    return s;
}

// Active cells K^beta of trait (x, y) (beta = 1: exactly K, at exponent 1).
inline Inoculum cells(const Scenario& s, double x, double y, double beta) {
    return validation::inoculum(x, y, std::round(std::pow(s.K, beta)));
}

inline RateOverride override_of(double x, double y) {
    RateOverride o;
    o.dormancy = x;
    o.transfer = y;
    return o;
}

inline int trait(const Scenario& s, double x, double y) {
    return *TraitGrid(s.dormancy_axis, s.transfer_axis).find(x, y);
}

// log(1 + K^beta) / ln K: the exact start of a trait inoculated with K^beta cells.
inline double start_exponent(const Scenario& s, double beta) {
    return std::log1p(std::round(std::pow(s.K, beta))) / std::log(s.K);
}

}  // namespace tessera::limittest
