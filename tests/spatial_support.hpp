// Shared pieces of the spatial tests (validation.md V6, V7, V12 and the boundary, wall and
// schedule checks): lattices built in code with every local event switched off unless a
// test asks for it, runs of the whole Engine per replicate, and sample moments.
//
// The seed policy and the error budget are those of validation_support.hpp: fixed seeds in
// CI, TESSERA_TEST_SEED=<n> replaces them, z_tolerance standard errors per moment check and
// chi-squared tests of size chi_squared_alpha.
#pragma once

#include <cmath>
#include <cstdint>
#include <limits>
#include <numeric>
#include <vector>

#include "core/engine.hpp"
#include "validation_support.hpp"

namespace tessera::spatial {

// A W x H lattice of one default habitat class, one trait, plain time, no local events at
// all (birth, death and competition 0) and no migration: tests switch on what they check.
inline Scenario quiet_lattice(int width, int height) {
    Scenario s = validation::one_patch_scenario();
    s.rates.birth_max = 0.0;
    s.rates.birth_cost_dormancy = 0.0;
    s.rates.birth_cost_transfer = 0.0;
    s.rates.death = 0.0;
    s.rates.competition = 0.0;
    s.rates.resuscitation = 0.0;
    s.width = width;
    s.height = height;
    s.habitat_of_patch.assign(static_cast<std::size_t>(width) * height, 0);
    s.inocula.clear();
    return s;
}

// `active` and `dormant` cells of trait (0, 0) in patch (col, row).
inline Inoculum cells_at(int col, int row, double active, double dormant = 0.0) {
    Inoculum in = validation::inoculum(0.0, 0.0, active, dormant);
    in.where = Inoculum::Where::patch;
    in.x0 = col;
    in.y0 = row;
    return in;
}

inline std::int64_t sum(const std::int64_t* v, int n) {
    return std::accumulate(v, v + n, std::int64_t{0});
}
inline std::int64_t active_in(const Engine& e, std::size_t p) {
    return sum(e.lattice().active(p), e.lattice().traits());
}
inline std::int64_t dormant_in(const Engine& e, std::size_t p) {
    return sum(e.lattice().dormant(p), e.lattice().traits());
}
// Every cell on the lattice, active and dormant.
inline std::int64_t cells(const Engine& e) {
    std::int64_t n = 0;
    for (std::size_t p = 0; p < e.lattice().patches(); ++p) n += active_in(e, p) + dormant_in(e, p);
    return n;
}

struct Moments {
    double mean = 0.0, variance = 0.0, mu4 = 0.0;  // mu4: central fourth moment
    double n = 0.0;
};

inline Moments sample_moments(const std::vector<double>& x) {
    Moments m;
    m.n = static_cast<double>(x.size());
    for (double v : x) m.mean += v;
    m.mean /= m.n;
    for (double v : x) {
        const double c = (v - m.mean) * (v - m.mean);
        m.variance += c;
        m.mu4 += c * c;
    }
    m.variance /= m.n - 1;
    m.mu4 /= m.n;
    return m;
}

inline Moments pmf_moments(const std::vector<double>& pmf) {
    Moments m;
    for (std::size_t k = 0; k < pmf.size(); ++k) m.mean += static_cast<double>(k) * pmf[k];
    for (std::size_t k = 0; k < pmf.size(); ++k) {
        const double c = (static_cast<double>(k) - m.mean) * (static_cast<double>(k) - m.mean);
        m.variance += c * pmf[k];
        m.mu4 += c * c * pmf[k];
    }
    return m;
}

// Standard error of a sample variance of n draws from a law with variance s2 and central
// fourth moment mu4 (exact for any law: Var(S^2) = (mu4 - s2^2 (n - 3)/(n - 1)) / n).
inline double variance_standard_error(double s2, double mu4, double n) {
    return std::sqrt(std::max(0.0, mu4 - s2 * s2 * (n - 3) / (n - 1)) / n);
}

// Binomial(n, p) probabilities, computed in logs (n up to a few thousand).
inline std::vector<double> binomial_pmf(int n, double p) {
    std::vector<double> f(static_cast<std::size_t>(n) + 1, 0.0);
    for (int k = 0; k <= n; ++k) {
        const double lg = std::lgamma(n + 1.0) - std::lgamma(k + 1.0) - std::lgamma(n - k + 1.0);
        const double lp = (k > 0 ? k * std::log(p) : 0.0) + (n - k > 0 ? (n - k) * std::log1p(-p) : 0.0);
        f[static_cast<std::size_t>(k)] = p <= 0.0 ? (k == 0 ? 1.0 : 0.0)
                                         : p >= 1.0 ? (k == n ? 1.0 : 0.0)
                                                    : std::exp(lg + lp);
    }
    return f;
}

inline std::vector<double> convolve(const std::vector<double>& a, const std::vector<double>& b) {
    std::vector<double> c(a.size() + b.size() - 1, 0.0);
    for (std::size_t i = 0; i < a.size(); ++i) {
        for (std::size_t j = 0; j < b.size(); ++j) c[i + j] += a[i] * b[j];
    }
    return c;
}

// Histogram of integer observations, for validation::chi_squared_test against a pmf.
inline std::vector<std::uint64_t> histogram(const std::vector<double>& x, std::size_t bins) {
    std::vector<std::uint64_t> h(bins, 0);
    for (double v : x) {
        const auto k = static_cast<std::size_t>(v);
        if (v >= 0 && k < bins) ++h[k];
    }
    return h;
}

}  // namespace tessera::spatial
