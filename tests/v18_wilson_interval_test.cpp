// V18 (validation.md): Wilson score intervals of invasion and extinction probabilities
// (src/study/wilson_interval.*), and the type-7 quantiles of ensemble.csv.
//
// Source of the formula: Wilson (1927), J. Amer. Statist. Assoc. 22:209-212; its behaviour
// near 0 and 1: Agresti & Coull (1998), Amer. Statist. 52:119-126. Tabulated examples:
// Newcombe (1998), Statistics in Medicine 17:857-872, Table I, "score method without
// continuity correction", to 4 decimals. THOSE FOUR ROWS ARE QUOTED FROM MEMORY; each was
// recomputed here from Wilson's formula with z = 1.959963984540054 (the 0.975 normal
// quantile) and agrees to all 4 decimals:
//   81/263 -> 0.255289 .. 0.366210      15/148 -> 0.062386 .. 0.160487
//    0/20  -> 0        .. 0.161125       1/29  -> 0.006113 .. 0.171755
// Tolerance 5e-5: half a unit of the table's last decimal. Two checks need no table: at k = 0
// the upper end is z^2 / (n + z^2) exactly, and at both ends the score statistic
// |p^ - p| / sqrt(p (1 - p) / n) equals z (the definition of the interval), to 1e-9.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "io/ensemble_table.hpp"
#include "study/ensemble_statistics.hpp"
#include "study/wilson_interval.hpp"

using namespace tessera;

namespace {
constexpr double table_tolerance = 5e-5;     // half a unit in the 4th decimal of the table
constexpr double definition_tolerance = 1e-9;  // rounding of a closed form, far below any use
}  // namespace

TEST_CASE("V18: Wilson intervals match the tabulated score intervals", "[wilson]") {
    struct Row {
        long k, n;
        double low, high;
    };
    for (const Row r : {Row{81, 263, 0.2553, 0.3662}, Row{15, 148, 0.0624, 0.1605}, Row{0, 20, 0.0, 0.1611},
                        Row{1, 29, 0.0061, 0.1718}}) {
        const WilsonInterval w = wilson_interval(r.k, r.n);
        INFO(r.k << "/" << r.n);
        CHECK(w.low == Approx(r.low).margin(table_tolerance));
        CHECK(w.high == Approx(r.high).margin(table_tolerance));
    }
}

TEST_CASE("V18: the ends are where the score test just rejects, and exact at k = 0 and k = n", "[wilson]") {
    for (long n : {1L, 4L, 20L, 263L}) {
        const double z2 = z_95 * z_95;
        CHECK(wilson_interval(0, n).low == 0.0);
        CHECK(wilson_interval(0, n).high == Approx(z2 / (n + z2)).margin(definition_tolerance));
        CHECK(wilson_interval(n, n).high == 1.0);
        CHECK(wilson_interval(n, n).low == Approx(n / (n + z2)).margin(definition_tolerance));
        for (long k = 1; k < n; ++k) {
            const WilsonInterval w = wilson_interval(k, n);
            const double p_hat = static_cast<double>(k) / static_cast<double>(n);
            for (double p : {w.low, w.high}) {
                CHECK(std::abs(p_hat - p) / std::sqrt(p * (1 - p) / static_cast<double>(n)) ==
                      Approx(z_95).margin(definition_tolerance));
            }
            // Symmetry: k successes and n - k failures give mirrored intervals.
            const WilsonInterval m = wilson_interval(n - k, n);
            CHECK(w.low == Approx(1 - m.high).margin(definition_tolerance));
        }
    }
}

TEST_CASE("type-7 quantiles (Hyndman & Fan 1996) on hand-computed cases", "[ensemble]") {
    // x = 1..10: h = 9 p, Q(0.1) = 1 + 0.9 = 1.9, Q(0.5) = 5.5, Q(0.9) = 9.1 (by hand from
    // the definition; R's quantile() default gives the same).
    std::vector<double> x;
    for (int i = 1; i <= 10; ++i) x.push_back(i);
    const EnsembleSummary s = summarize(x);
    CHECK(s.q10 == Approx(1.9).margin(1e-12));
    CHECK(s.median == Approx(5.5).margin(1e-12));
    CHECK(s.q90 == Approx(9.1).margin(1e-12));
    CHECK(s.mean == Approx(5.5).margin(1e-12));
    // Unsorted input with ties: sorted 1 1 3 4 5; Q(0.1) at h = 0.4 is 1, Q(0.9) at h = 3.6 is 4.6.
    const EnsembleSummary t = summarize({3, 1, 4, 1, 5});
    CHECK(t.q10 == 1.0);
    CHECK(t.median == 3.0);
    CHECK(t.q90 == Approx(4.6).margin(1e-12));
    CHECK(summarize({7}).q90 == 7.0);
}

TEST_CASE("ensemble.csv from a series: one row per time and trait, present, per-patch exponents", "[ensemble]") {
    Scenario s;
    s.K = 100;
    s.width = 2;
    s.habitats = {Habitat{}, Habitat{}};
    s.habitats[1].capacity = 0.5;
    s.habitat_of_patch = {0, 1};  // P = 1.5
    const std::string series =
        "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent\n"
        "0,0,0,0,0,10,0,0.52\n"
        "0,0,0,2,0,0,0,0\n"
        "0,1,0.217,0,0,99,0,1\n"
        "0,1,0.217,2,0,3,0,0.3\n"
        "1,0,0,0,0,10,0,0.52\n"
        "1,0,0,2,0,0,0,0\n"
        "1,1,0.217,0,0,40,9,0.85\n"
        "1,1,0.217,2,0,0,0,0\n";
    const std::string table = ensemble_csv(series, s);
    std::vector<std::string> lines;
    std::size_t pos = 0;
    while (pos < table.size()) {
        const std::size_t end = table.find('\n', pos);
        lines.push_back(table.substr(pos, end - pos));
        pos = end + 1;
    }
    REQUIRE(lines.size() == 5);
    CHECK(lines[0] == ensemble_header().substr(0, ensemble_header().size() - 1));
    CHECK(lines[1].rfind("0,0,0,0,2,1,0.52,0.52,0.52,0.52,", 0) == 0);
    CHECK(lines[2] == "0,0,2,0,2,0,0,0,0,0,0,0,0,0,0,0,0,0");
    auto fields = [](const std::string& line) {
        std::vector<double> f;
        std::size_t s0 = 0;
        for (;;) {
            const std::size_t c = line.find(',', s0);
            f.push_back(std::stod(line.substr(s0, c == std::string::npos ? std::string::npos : c - s0)));
            if (c == std::string::npos) return f;
            s0 = c + 1;
        }
    };
    // t = 1, trait (2,0): present in 1 of 2; exponents 0.3 and 0, counts 3 and 0.
    const std::vector<double> e = fields(lines[4]);
    REQUIRE(e.size() == 18);
    const std::vector<double> expected{1, 0.217, 2, 0, 2, 0.5, 0.15, 0.15, 0.03, 0.27};
    for (std::size_t k = 0; k < expected.size(); ++k) CHECK(e[k] == Approx(expected[k]).margin(1e-15));
    for (std::size_t k = 14; k < 18; ++k) CHECK(e[k] == Approx(std::vector<double>{1.5, 1.5, 0.3, 2.7}[k - 14]).margin(1e-15));
    // exponent_per_patch of (0,0) at t = 1: counts 99 and 49, log(1 + N / 1.5) / log(100).
    const double a = std::log1p(99 / 1.5) / std::log(100.0), b = std::log1p(49 / 1.5) / std::log(100.0);
    const std::vector<double> f = fields(lines[3]);
    REQUIRE(f.size() == 18);
    CHECK(f[10] == Approx((a + b) / 2).epsilon(1e-15));
    CHECK(f[12] == Approx(b + 0.1 * (a - b)).epsilon(1e-15));
    // Replicates of unequal length are refused.
    CHECK_THROWS_AS(ensemble_csv(series + "1,2,0.4,0,0,1,0,0\n", s), std::runtime_error);
}
