#include "core/random_draws.hpp"

#include <cmath>
#include <numbers>

namespace tessera {

namespace {

// log k! - (k log k - k) for k >= 10: 0.5 log(2 pi k) plus Stirling's series to 1/k^5,
// exact to below 1e-12 there (Abramowitz & Stegun 6.1.41). Computed as the remainder
// itself, never as a difference of terms of size k log k.
double stirling_remainder(double k) {
    const double r = 1.0 / k;
    const double r2 = r * r;
    return 0.5 * std::log(2 * std::numbers::pi * k) + r * (1.0 / 12 - r2 * (1.0 / 360 - r2 / 1260));
}

// log of the Poisson probability of k at mean `mean`, written so that no large terms cancel:
// -mean + k log(mean) - log k!  =  (k - mean) - k log1p((k - mean)/mean) - [log k! - k log k + k].
// At mean 1e12 the naive form loses about 1e-3 in absolute terms; this one keeps ~1e-9.
double log_poisson_pmf(double k, double mean) {
    if (k < 10) return -mean + k * std::log(mean) - std::lgamma(k + 1);
    const double delta = k - mean;
    return delta - k * std::log1p(delta / mean) - stirling_remainder(k);
}

std::int64_t poisson_inversion(Rng& rng, double mean) {
    const double u = rng.uniform();
    // k = 0 exactly when u <= exp(-mean); since exp(-mean) >= 1 - mean, u < 1 - mean decides
    // it without the exponential. The leap engine draws many channels of mean well below 1
    // (rare traits' deaths, mutant births over a short leap), where this is nearly always so.
    if (u < 1.0 - mean) return 0;
    double p = std::exp(-mean);
    double F = p;
    std::int64_t k = 0;
    // The search ends by k ~ mean + 40 sqrt(mean) at the latest (the mass beyond is far below
    // the 2^-53 resolution of u); the cap only guards against rounding in F.
    while (u > F && k < 200) {
        ++k;
        p *= mean / static_cast<double>(k);
        F += p;
    }
    return k;
}

// PTRS, Hormann (1993), with the constants of the paper's Table 1 ("transformed rejection
// with squeeze"), as used in NumPy's random_poisson_ptrs.
std::int64_t poisson_ptrs(Rng& rng, double mean) {
    const double slam = std::sqrt(mean);
    const double b = 0.931 + 2.53 * slam;
    const double a = -0.059 + 0.02483 * b;
    const double vr = 0.9277 - 3.6224 / (b - 2);
    // log(1/alpha) is needed only past the squeeze (about 1 draw in 7): computed then, once.
    double log_invalpha = 0.0;
    for (;;) {
        const double U = rng.uniform() - 0.5;
        const double V = rng.uniform();
        const double us = 0.5 - std::fabs(U);
        const double k = std::floor((2 * a / us + b) * U + mean + 0.43);
        if (us >= 0.07 && V <= vr) return static_cast<std::int64_t>(k);
        if (k < 0 || (us < 0.013 && V > us)) continue;
        if (log_invalpha == 0.0) log_invalpha = std::log(1.1239 + 1.1328 / (b - 3.4));
        if (std::log(V) + log_invalpha - std::log(a / (us * us) + b) <= log_poisson_pmf(k, mean)) {
            return static_cast<std::int64_t>(k);
        }
    }
}

std::int64_t binomial_inversion(Rng& rng, std::int64_t n, double p) {
    const double ratio = p / (1 - p);
    double f = std::exp(static_cast<double>(n) * std::log1p(-p));
    double F = f;
    const double u = rng.uniform();
    std::int64_t k = 0;
    while (u > F && k < n) {
        f *= ratio * static_cast<double>(n - k) / static_cast<double>(k + 1);
        ++k;
        F += f;
        if (f < 1e-300 && k > 200) break;  // rounding left u above the total mass
    }
    return k;
}

// log(k!) - log(m!) for k, m >= 0, without forming either: at k, m ~ 1e12 each is ~3e13 and
// their difference would keep only ~1e-3 of absolute precision. With d = k - m (exact, in
// integers) and log x! = x log x - x + R(x) (R: stirling_remainder),
// k log k - m log m = d log m + k log1p(d / m), whose terms are of size d.
double log_factorial_ratio(std::int64_t k, std::int64_t m) {
    if (k < 10 || m < 10) return std::lgamma(static_cast<double>(k) + 1) - std::lgamma(static_cast<double>(m) + 1);
    const double d = static_cast<double>(k - m);
    const double km = static_cast<double>(k);
    const double mm = static_cast<double>(m);
    return d * std::log(mm) + km * std::log1p(d / mm) - d + stirling_remainder(km) - stirling_remainder(mm);
}

// BTRS, Hormann's transformed rejection with squeeze for the binomial (W. Hormann 1993, "The
// generation of binomial random variates", J. Statist. Comput. Simul. 46:101-110), for
// p <= 1/2 and n p >= 10. O(1) per draw for any n: no table, no set-up beyond a square root;
// the acceptance test compares with f(k) / f(mode) computed as a ratio (above), so it stays
// exact at n ~ 1e12, where the migration phase draws it.
std::int64_t binomial_btrs(Rng& rng, std::int64_t n, double p) {
    const double q = 1 - p;
    const double nd = static_cast<double>(n);
    const double spq = std::sqrt(nd * p * q);
    const double b = 1.15 + 2.53 * spq;
    const double a = -0.0873 + 0.0248 * b + 0.01 * p;
    const double c = nd * p + 0.5;
    const double vr = 0.92 - 4.2 / b;
    const auto mode = static_cast<std::int64_t>(std::floor((nd + 1) * p));
    double alpha = 0.0, lpq = 0.0;  // needed only past the squeeze: computed then, once
    for (;;) {
        const double U = rng.uniform() - 0.5;
        const double V = rng.uniform();
        const double us = 0.5 - std::fabs(U);
        const double kd = std::floor((2 * a / us + b) * U + c);
        if (kd < 0 || kd > nd) continue;
        const auto k = static_cast<std::int64_t>(kd);
        if (us >= 0.07 && V <= vr) return k;
        if (alpha == 0.0) {
            alpha = (2.83 + 5.1 / b) * spq;
            lpq = std::log(p / q);
        }
        const double lhs = std::log(V * alpha / (a / (us * us) + b));
        const double log_f_ratio = -log_factorial_ratio(k, mode) - log_factorial_ratio(n - k, n - mode) +
                                   static_cast<double>(k - mode) * lpq;
        if (lhs <= log_f_ratio) return k;
    }
}

// Set bits of x, without a library call on CPUs built for without a popcount instruction
// (the generic x86-64 target): the usual SWAR sum of bit counts.
int ones(std::uint64_t x) {
    x = x - ((x >> 1) & 0x5555555555555555ull);
    x = (x & 0x3333333333333333ull) + ((x >> 2) & 0x3333333333333333ull);
    x = (x + (x >> 4)) & 0x0f0f0f0f0f0f0f0full;
    return static_cast<int>((x * 0x0101010101010101ull) >> 56);
}

// Adds to out[v] the number of the `fields` bit fields of `bits` (2 or 3) bits, low ones
// first, of `word` that hold the value v: from the counts of ones in each bit plane and in
// their intersections, by inclusion and exclusion.
void count_fields(std::uint64_t word, int bits, int fields, std::int64_t* out) {
    // The lowest bit of every field: bits 0, 2, .., 62 or bits 0, 3, .., 60.
    const std::uint64_t every = bits == 2 ? 0x5555555555555555ull : 0111111111111111111111ull;
    const std::uint64_t used = fields * bits >= 64 ? ~0ull : (std::uint64_t{1} << (fields * bits)) - 1;
    const std::uint64_t mask = every & used;
    const std::uint64_t a = word & mask, b = (word >> 1) & mask;
    if (bits == 2) {
        const int ab = ones(a & b), na = ones(a), nb = ones(b);
        out[1] += na - ab;
        out[2] += nb - ab;
        out[3] += ab;
        out[0] += fields - na - nb + ab;
        return;
    }
    const std::uint64_t c = (word >> 2) & mask;
    const int abc = ones(a & b & c), ab = ones(a & b), ac = ones(a & c), bc = ones(b & c);
    const int na = ones(a), nb = ones(b), nc = ones(c);
    out[7] += abc;
    out[3] += ab - abc;
    out[5] += ac - abc;
    out[6] += bc - abc;
    out[1] += na - ab - ac + abc;
    out[2] += nb - ab - bc + abc;
    out[4] += nc - ac - bc + abc;
    out[0] += fields - na - nb - nc + ab + ac + bc - abc;
}

}  // namespace

void split_uniformly(Rng& rng, std::int64_t n, int ways, std::int64_t* out) {
    for (int w = 0; w < ways; ++w) out[w] = 0;
    if ((ways == 4 || ways == 8) && n <= 4096) {
        const int bits = ways == 4 ? 2 : 3;
        const int per_word = 64 / bits;  // 32 or 21
        for (; n >= per_word; n -= per_word) count_fields(rng(), bits, per_word, out);
        if (n > 0) count_fields(rng(), bits, static_cast<int>(n), out);
        return;
    }
    for (int w = 0; w + 1 < ways && n > 0; ++w) {
        out[w] = binomial(rng, n, 1.0 / (ways - w));
        n -= out[w];
    }
    out[ways - 1] += n;
}

std::int64_t poisson(Rng& rng, double mean) {
    if (!(mean > 0)) return 0;
    if (mean < 10) return poisson_inversion(rng, mean);
    return poisson_ptrs(rng, mean);
}

std::int64_t binomial(Rng& rng, std::int64_t n, double p) {
    if (n <= 0 || !(p > 0)) return 0;
    if (p >= 1) return n;
    if (p > 0.5) return n - binomial(rng, n, 1 - p);
    if (static_cast<double>(n) * p < 10) return binomial_inversion(rng, n, p);
    return binomial_btrs(rng, n, p);
}

}  // namespace tessera
