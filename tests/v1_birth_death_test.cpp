// V1 (validation.md): the linear birth-death process, one trait, no competition.
//
// Source: D. G. Kendall (1948), "On the generalized 'birth-and-death' process", Ann. Math.
// Statist. 19:1-15; N. T. J. Bailey (1964), The Elements of Stochastic Processes, ch. 8
// (section 8.6; section and equation numbers from memory). With birth rate b, death rate
// d, r = b - d, E = e^{rt}, n0 cells at t = 0:
//
//   mean             n0 E
//   variance         n0 (b + d)/(b - d) E (E - 1)
//   P(extinct by t)  alpha^n0,  alpha = d (E - 1) / (b E - d)
//   P(extinct ever)  (d/b)^n0  (b > d)
//
// and, from one ancestor, P(0) = alpha, P(n) = (1 - alpha)(1 - beta) beta^(n-1) for n >= 1
// with beta = b (E - 1) / (b E - d) (Bailey 1964, eq. 8.47; the form is quoted from memory,
// so the test first checks that it reproduces the published mean and variance above before
// using it for the exact standard error of the sample variance and for a chi-squared test
// of the whole distribution).
//
// Tolerances: z_tolerance (5) standard errors, where the standard errors are exact: of the
// mean sigma / sqrt(N); of a proportion sqrt(p (1 - p) / N); of the sample variance
// sqrt((mu4 - sigma^4 (N - 3)/(N - 1)) / N) with mu4 from the exact distribution. With
// N = 40000 replicates a factor 2 in b or d moves every quantity by tens of standard
// errors. The distributions are tested with a chi-squared test of size chi_squared_alpha.
//
// "Extinct ever" is measured as "hits 0 before the count is seen at or above M = 60 at a
// check every 0.25 time units". A lineage seen at n >= M still dies out with probability
// (d/b)^n <= 2^-60 ~ 1e-18, which is the only bias and is far below the tolerance.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdint>
#include <vector>

#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

namespace {

struct BirthDeath {
    double b, d;
    std::int64_t n0;

    double E(double t) const { return std::exp((b - d) * t); }
    double alpha(double t) const { return d * (E(t) - 1) / (b * E(t) - d); }
    double beta(double t) const { return b * (E(t) - 1) / (b * E(t) - d); }
    double mean(double t) const { return static_cast<double>(n0) * E(t); }
    double variance(double t) const {
        return static_cast<double>(n0) * (b + d) / (b - d) * E(t) * (E(t) - 1);
    }
    double p_extinct_by(double t) const { return std::pow(alpha(t), static_cast<double>(n0)); }

    // The distribution of the count at t: the one-ancestor law convolved n0 times, cut
    // where the remaining tail is below 1e-16.
    std::vector<double> pmf(double t) const {
        const double a = alpha(t), be = beta(t);
        // After the term for n, the tail left is (1 - alpha) beta^n exactly.
        std::vector<double> one{a};
        for (int n = 1; n == 1 || (1 - a) * std::pow(be, n - 1) > 1e-17; ++n) {
            one.push_back((1 - a) * (1 - be) * std::pow(be, n - 1));
        }
        std::vector<double> sum{1.0};
        for (std::int64_t k = 0; k < n0; ++k) {
            std::vector<double> next(sum.size() + one.size() - 1, 0.0);
            for (std::size_t i = 0; i < sum.size(); ++i) {
                for (std::size_t j = 0; j < one.size(); ++j) next[i + j] += sum[i] * one[j];
            }
            sum.swap(next);
        }
        return sum;
    }
};

struct Moments {
    double mean = 0, variance = 0, mu4 = 0;
};

Moments moments_of(const std::vector<double>& pmf) {
    Moments m;
    for (std::size_t n = 0; n < pmf.size(); ++n) m.mean += static_cast<double>(n) * pmf[n];
    for (std::size_t n = 0; n < pmf.size(); ++n) {
        const double c = static_cast<double>(n) - m.mean;
        m.variance += c * c * pmf[n];
        m.mu4 += c * c * c * c * pmf[n];
    }
    return m;
}

Moments moments_of(const std::vector<std::int64_t>& sample) {
    Moments m;
    const double N = static_cast<double>(sample.size());
    for (auto v : sample) m.mean += static_cast<double>(v);
    m.mean /= N;
    for (auto v : sample) {
        const double c = static_cast<double>(v) - m.mean;
        m.variance += c * c;
    }
    m.variance /= N - 1;
    return m;
}

double fraction_zero(const std::vector<std::int64_t>& sample) {
    double z = 0;
    for (auto v : sample) z += v == 0 ? 1 : 0;
    return z / static_cast<double>(sample.size());
}

// Runs N replicates of the process, recording the count at each of `times` and, when
// `until_fate` is set, whether the lineage died out (see the file comment).
struct Outcome {
    std::vector<std::vector<std::int64_t>> at;  // [time][replicate]
    std::vector<std::uint8_t> extinct;          // [replicate]
};

Outcome simulate(const BirthDeath& bd, const std::vector<double>& times, std::uint32_t N,
                 std::uint64_t seed, bool until_fate) {
    Scenario s = one_patch_scenario();
    s.rates.birth_max = bd.b;
    s.rates.death = bd.d;
    s.rates.competition = 0.0;
    const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
    const RateTable rates(grid, s.rates, s.K);
    Outcome out;
    out.at.assign(times.size(), std::vector<std::int64_t>(N));
    out.extinct.assign(N, 0);
    for_replicates(N, [&](std::uint32_t rep) {
        PatchRun run(grid, rates, s.K, PatchConditions{}, seed, rep);
        run.active[0] = bd.n0;
        double t = 0;
        for (std::size_t k = 0; k < times.size(); ++k) {
            run.advance(times[k] - t);
            t = times[k];
            out.at[k][rep] = run.active[0];
        }
        if (until_fate) {
            constexpr std::int64_t M = 60;
            for (int i = 0; i < 100000 && run.active[0] > 0 && run.active[0] < M; ++i) run.advance(0.25);
            out.extinct[rep] = run.active[0] == 0 ? 1 : 0;
        }
    });
    return out;
}

void check_against_kendall(const BirthDeath& bd, const std::vector<double>& times, const Outcome& out) {
    const double N = static_cast<double>(out.at[0].size());
    for (std::size_t k = 0; k < times.size(); ++k) {
        const double t = times[k];
        INFO("b = " << bd.b << ", d = " << bd.d << ", n0 = " << bd.n0 << ", t = " << t);
        const std::vector<double> pmf = bd.pmf(t);
        const Moments exact = moments_of(pmf);
        // The quoted one-ancestor law must reproduce Kendall's mean and variance.
        REQUIRE(exact.mean == Approx(bd.mean(t)).epsilon(1e-9));
        REQUIRE(exact.variance == Approx(bd.variance(t)).epsilon(1e-9));
        REQUIRE(pmf[0] == Approx(bd.p_extinct_by(t)).epsilon(1e-12));

        const Moments seen = moments_of(out.at[k]);
        const double se_mean = std::sqrt(exact.variance / N);
        CHECK(std::fabs(seen.mean - bd.mean(t)) <= z_tolerance * se_mean);
        const double s4 = exact.variance * exact.variance;
        const double se_var = std::sqrt((exact.mu4 - s4 * (N - 3) / (N - 1)) / N);
        CHECK(std::fabs(seen.variance - bd.variance(t)) <= z_tolerance * se_var);
        const double p0 = bd.p_extinct_by(t);
        CHECK(std::fabs(fraction_zero(out.at[k]) - p0) <= z_tolerance * std::sqrt(p0 * (1 - p0) / N));

        std::vector<std::uint64_t> hist(pmf.size(), 0);
        for (auto v : out.at[k]) {
            if (static_cast<std::size_t>(v) < hist.size()) ++hist[static_cast<std::size_t>(v)];
        }
        const ChiSquared chi = chi_squared_test(pmf, hist, out.at[k].size(), chi_squared_alpha);
        INFO(chi.describe());
        CHECK(chi.passed());
    }
}

}  // namespace

TEST_CASE("V1 supercritical linear birth-death matches Kendall (1948)", "[validation][V1]") {
    const BirthDeath bd{2.0, 1.0, 3};
    const std::vector<double> times{0.5, 1.0, 2.0};
    const std::uint32_t N = 40000;
    const Outcome out = simulate(bd, times, N, test_seed(101), true);
    check_against_kendall(bd, times, out);

    // Eventual extinction: (d/b)^n0 = 1/8.
    const double p = std::pow(bd.d / bd.b, static_cast<double>(bd.n0));
    double extinct = 0;
    for (auto e : out.extinct) extinct += e;
    extinct /= N;
    INFO("P(extinct ever) seen " << extinct << ", Kendall " << p);
    CHECK(std::fabs(extinct - p) <= z_tolerance * std::sqrt(p * (1 - p) / N));
}

TEST_CASE("V1 subcritical linear birth-death matches Kendall (1948)", "[validation][V1]") {
    const BirthDeath bd{1.0, 2.0, 10};
    const std::vector<double> times{0.5, 1.5};
    check_against_kendall(bd, times, simulate(bd, times, 40000, test_seed(102), false));
}

TEST_CASE("V1 pure death is binomial thinning (Kendall 1948 with b = 0)", "[validation][V1]") {
    const BirthDeath bd{0.0, 1.0, 10};
    const std::vector<double> times{0.3, 1.0};
    check_against_kendall(bd, times, simulate(bd, times, 40000, test_seed(103), false));
}
