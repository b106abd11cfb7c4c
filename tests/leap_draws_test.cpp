// The Poisson and binomial samplers of the leap engine (src/core/random_draws.hpp) against
// their distributions: Pearson chi-squared goodness of fit of the whole distribution where
// it is small enough to tabulate, and mean and variance (z-tests) where it is not.
//
// Sources: the Poisson and binomial probability mass functions and moments (any textbook,
// e.g. Feller 1968, An Introduction to Probability Theory and Its Applications I, ch. VI);
// the samplers are Hormann (1993) PTRS and inversion (Devroye 1986), see random_draws.hpp.
// Tolerances: chi-squared tests of size validation::chi_squared_alpha (1e-6); z-tests at
// validation::z_tolerance (5) standard errors, the standard error of the sample mean
// sqrt(var / n) and of the sample variance from the fourth central moment of the
// distribution (Poisson: mu4 = m + 3 m^2). A sampler off by a factor 2 in the mean, or by
// 10% in the variance at these sample sizes, fails.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "core/random_draws.hpp"
#include "validation_support.hpp"

using namespace tessera;

namespace {

std::vector<double> poisson_pmf(double m, int kmax) {
    std::vector<double> p(kmax + 1);
    for (int k = 0; k <= kmax; ++k) p[k] = std::exp(-m + k * std::log(m) - std::lgamma(k + 1.0));
    return p;
}

std::vector<double> binomial_pmf(std::int64_t n, double q, int kmax) {
    std::vector<double> p(kmax + 1);
    for (int k = 0; k <= kmax && k <= n; ++k) {
        p[k] = std::exp(std::lgamma(n + 1.0) - std::lgamma(k + 1.0) - std::lgamma(n - k + 1.0) +
                        k * std::log(q) + (n - k) * std::log1p(-q));
    }
    return p;
}

}  // namespace

TEST_CASE("Poisson sampler fits the Poisson distribution (inversion and PTRS)", "[leap][draws]") {
    for (double m : {0.05, 0.7, 4.0, 9.9, 10.0, 14.0, 60.0, 400.0}) {
        Rng rng(StreamKey{validation::test_seed(7), 0, 0}, static_cast<std::uint64_t>(m * 100), Phase::local);
        const int kmax = static_cast<int>(m + 12 * std::sqrt(m) + 20);
        const std::uint64_t n = 200000;
        std::vector<std::uint64_t> observed(kmax + 1, 0);
        for (std::uint64_t i = 0; i < n; ++i) {
            const std::int64_t k = poisson(rng, m);
            if (k >= 0 && k <= kmax) ++observed[k];  // a negative k lands in "anything else" and fails
        }
        const auto r = validation::chi_squared_test(poisson_pmf(m, kmax), observed, n, validation::chi_squared_alpha);
        INFO("mean " << m << ": " << r.describe());
        CHECK(r.passed());
    }
}

TEST_CASE("Poisson sampler has the right mean and variance at very large means", "[leap][draws]") {
    for (double m : {1e6, 1e9, 1e12, 1e15}) {
        Rng rng(StreamKey{validation::test_seed(8), 0, 0}, static_cast<std::uint64_t>(std::log10(m)), Phase::local);
        const int n = 100000;
        double sum = 0, sum2 = 0;
        for (int i = 0; i < n; ++i) {
            const double d = static_cast<double>(poisson(rng, m)) - m;  // centred: no cancellation
            sum += d;
            sum2 += d * d;
        }
        const double mean_dev = sum / n;
        const double var = sum2 / n - mean_dev * mean_dev;
        INFO("mean " << m << ": sample mean - m = " << mean_dev << ", variance / m = " << var / m);
        CHECK(std::fabs(mean_dev) <= validation::z_tolerance * std::sqrt(m / n));
        const double se_var = std::sqrt((m + 3 * m * m - m * m) / n);  // (mu4 - sigma^4) / n
        CHECK(std::fabs(var - m) <= validation::z_tolerance * se_var);
    }
}

TEST_CASE("Binomial sampler fits the binomial distribution", "[leap][draws]") {
    struct Case {
        std::int64_t n;
        double p;
    };
    for (Case c : {Case{5, 0.3}, Case{40, 0.1}, Case{200, 0.04}, Case{1000, 0.02}, Case{300, 0.4}, Case{50, 0.9},
                   Case{100000, 0.001}, Case{600, 0.5}, Case{2000000, 0.0005}, Case{1000000, 0.25}}) {
        Rng rng(StreamKey{validation::test_seed(9), 0, 0}, static_cast<std::uint64_t>(c.n), Phase::local);
        const double m = c.n * c.p;
        const int kmax = static_cast<int>(std::min<double>(c.n, m + 12 * std::sqrt(m) + 20));
        const std::uint64_t n = 200000;
        std::vector<std::uint64_t> observed(kmax + 1, 0);
        for (std::uint64_t i = 0; i < n; ++i) {
            const std::int64_t k = binomial(rng, c.n, c.p);
            if (k >= 0 && k <= kmax) ++observed[k];  // anything off the support fails the fit
        }
        const auto r = validation::chi_squared_test(binomial_pmf(c.n, c.p, kmax), observed, n,
                                                    validation::chi_squared_alpha);
        INFO("n " << c.n << " p " << c.p << ": " << r.describe());
        CHECK(r.passed());
    }
}

// BTRS at the sizes the migration phase meets on large lattices (n up to 1e12 cells, p from
// 5e-4 leaving a patch in a step to 1/4 for the direction): mean and variance against
// n p and n p (1 - p). The fourth central moment of the binomial is
// n p q (1 + 3 (n - 2) p q) (Feller 1968, ch. XI), which gives the variance's standard error.
TEST_CASE("Binomial sampler has the right mean and variance at very large n", "[leap][draws]") {
    struct Case {
        std::int64_t n;
        double p;
    };
    for (Case c : {Case{1000000, 0.0005}, Case{1000000000, 0.0005}, Case{1000000000000, 0.0005},
                   Case{1000000000000, 0.25}, Case{4000000000000000000, 1e-12}}) {
        Rng rng(StreamKey{validation::test_seed(10), 0, 0}, static_cast<std::uint64_t>(c.p * 1e6) ^ c.n,
                Phase::local);
        const double nd = static_cast<double>(c.n);
        const double m = nd * c.p;
        const double v = m * (1 - c.p);
        const int draws = 100000;
        double sum = 0, sum2 = 0;
        for (int i = 0; i < draws; ++i) {
            const std::int64_t k = binomial(rng, c.n, c.p);
            REQUIRE(k >= 0);
            REQUIRE(k <= c.n);
            const double d = static_cast<double>(k) - m;  // centred: no cancellation
            sum += d;
            sum2 += d * d;
        }
        const double mean_dev = sum / draws;
        const double var = sum2 / draws - mean_dev * mean_dev;
        INFO("n " << c.n << " p " << c.p << ": sample mean - np = " << mean_dev << ", variance / npq = " << var / v);
        CHECK(std::fabs(mean_dev) <= validation::z_tolerance * std::sqrt(v / draws));
        const double mu4 = v * (1 + 3 * (nd - 2) * c.p * (1 - c.p));
        CHECK(std::fabs(var - v) <= validation::z_tolerance * std::sqrt((mu4 - v * v) / draws));
    }
}

// The uniform split of the migration phase (n leavers over 4 or 8 directions): a multinomial
// with equal cell probabilities, whose marginals are binomial and whose covariances are
// -n p_i p_j (Feller 1968, ch. VI, the multinomial distribution; from memory). Every count
// sums to n; the first and the last direction
// each fit Binomial(n, 1/ways) (chi-squared, as above); two directions have the
// multinomial's covariance -n / ways^2 (z-test with the sample covariance's standard error
// from its fourth moments, approximated by sqrt(var_a var_b / draws)). A split that favoured
// a direction, or packed bits wrongly at a word's end (n = 31, 32, 33 and 20, 21, 22 cross
// it), fails.
TEST_CASE("Uniform split fits the equal-probability multinomial", "[leap][draws]") {
    for (int ways : {4, 8}) {
        for (std::int64_t items : {1, 5, 20, 21, 22, 31, 32, 33, 100, 1000, 6000}) {
            Rng rng(StreamKey{validation::test_seed(11), 0, static_cast<std::uint32_t>(ways)},
                    static_cast<std::uint64_t>(items), Phase::local);
            const double p = 1.0 / ways;
            const int kmax = static_cast<int>(std::min<double>(items, items * p + 12 * std::sqrt(items * p) + 20));
            const std::uint64_t draws = 100000;
            std::vector<std::uint64_t> first(kmax + 1, 0), last(kmax + 1, 0);
            double s0 = 0, s1 = 0, s01 = 0;
            bool sums = true;
            for (std::uint64_t d = 0; d < draws; ++d) {
                std::int64_t out[8];
                split_uniformly(rng, items, ways, out);
                std::int64_t total = 0;
                for (int w = 0; w < ways; ++w) total += out[w];
                sums = sums && total == items;
                if (out[0] >= 0 && out[0] <= kmax) ++first[out[0]];
                if (out[ways - 1] >= 0 && out[ways - 1] <= kmax) ++last[out[ways - 1]];
                s0 += static_cast<double>(out[0]);
                s1 += static_cast<double>(out[1]);
                s01 += static_cast<double>(out[0]) * static_cast<double>(out[1]);
            }
            INFO(ways << " ways, " << items << " items");
            CHECK(sums);
            const auto pmf = binomial_pmf(items, p, kmax);
            const auto r0 = validation::chi_squared_test(pmf, first, draws, validation::chi_squared_alpha);
            const auto r1 = validation::chi_squared_test(pmf, last, draws, validation::chi_squared_alpha);
            INFO("first: " << r0.describe() << "; last: " << r1.describe());
            CHECK(r0.passed());
            CHECK(r1.passed());
            const double n = static_cast<double>(draws);
            const double cov = s01 / n - (s0 / n) * (s1 / n);
            const double var = static_cast<double>(items) * p * (1 - p);
            INFO("covariance " << cov << ", expected " << -static_cast<double>(items) * p * p);
            CHECK(std::fabs(cov + static_cast<double>(items) * p * p) <= validation::z_tolerance * var / std::sqrt(n));
        }
    }
}
