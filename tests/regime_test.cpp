// Regime classification (src/study/regime.*) on series and limit predictions built by hand:
// every regime, and the edge cases the rule has to get right (an empty series, extinction
// after growth, a trait just under the threshold, noise around the threshold, a single
// return, cycles outside the final window, a population below the resident level, a run
// still in transition at its end). The rule: docs/model.md "Regimes".
#include <catch2/catch.hpp>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "study/regime.hpp"
#include "theory/exponent_limit.hpp"

using namespace tessera;

namespace {

// Output times 0, 0.1, ..., `until` (t / ln K) and exponents from `at(t)` per trait.
ExponentSeries series_of(int traits, double until, const std::function<std::vector<double>(double)>& at) {
    ExponentSeries s;
    const int n = static_cast<int>(std::lround(until / 0.1));
    for (int k = 0; k <= n; ++k) {
        const double t = 0.1 * k;
        s.t_logK.push_back(t);
        std::vector<double> e = at(t);
        REQUIRE(static_cast<int>(e.size()) == traits);
        s.exponents.push_back(e);
    }
    return s;
}

// Trait `(int)(t / phase) % 3` leads at exponent 1, the other two sit at 0.5 (a transfer cycle).
std::vector<double> rotating(double t, double phase) {
    std::vector<double> e(3, 0.5);
    e[static_cast<std::size_t>(static_cast<int>(std::floor(t / phase + 1e-9)) % 3)] = 1.0;
    return e;
}

bool stub_limit() {
    const auto why = limit_not_applicable(Scenario{});
    return why && why->find("not built yet") != std::string::npos;
}

}  // namespace

TEST_CASE("an empty series is extinct at t = 0", "[regime]") {
    const Outcome o = classify_series({});
    CHECK(o.regime == Regime::extinct);
    CHECK(o.residents.empty());
    CHECK(o.final_t_logK == 0.0);
}

TEST_CASE("a population that grew and then died out is extinct", "[regime]") {
    const auto s = series_of(2, 10, [](double t) { return t < 9.95 ? std::vector<double>{1.0, 0.4} : std::vector<double>{0, 0}; });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::extinct);
    CHECK(o.residents.empty());
    CHECK(o.final_t_logK == Approx(10.0));
    CHECK_FALSE(o.period);
}

TEST_CASE("one trait at exponent 1 is resident, a trait just below 1 - eps is not", "[regime]") {
    RegimeSettings settings;  // eps 0.1
    const auto s = series_of(3, 10, [](double) { return std::vector<double>{0.5, 1.02, 0.89}; });
    const Outcome o = classify_series(s, settings);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{1});
    // With a wider eps the third trait leads too.
    settings.eps = 0.15;
    const Outcome wide = classify_series(s, settings);
    CHECK(wide.regime == Regime::coexistence);
    CHECK(wide.residents == std::vector<int>{1, 2});
}

TEST_CASE("two traits near 1 over the final window coexist", "[regime]") {
    const auto s = series_of(4, 10, [](double) { return std::vector<double>{0.98, 0.0, 0.93, 0.3}; });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::coexistence);
    CHECK(o.residents == std::vector<int>{0, 2});
}

TEST_CASE("a leading set that rotates through three traits is cycling, with its period", "[regime]") {
    // Phases of 0.5 t/lnK each: period 1.5; the final window (last 25 % of 0..20) holds 3.3 cycles.
    const auto s = series_of(3, 20, [](double t) { return rotating(t, 0.5); });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::cycling);
    CHECK(o.residents == std::vector<int>{0, 1, 2});
    REQUIRE(o.period);
    CHECK(*o.period == Approx(1.5).margin(1e-9));
}

TEST_CASE("a single return to an earlier set is not a cycle: the set at the end decides", "[regime]") {
    // A leads, then B for a while, then A again: one return in the final window.
    const auto s = series_of(2, 20, [](double t) {
        const bool b = t > 16.0 && t < 18.0;
        return b ? std::vector<double>{0.5, 1.0} : std::vector<double>{1.0, 0.5};
    });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{0});
    // Two returns (A B A B) do cycle, with the default min_returns = 2.
    const auto twice = series_of(2, 20, [](double t) {
        const bool b = (t > 15.5 && t < 17.0) || (t > 18.0 && t < 19.5);
        return b ? std::vector<double>{0.5, 1.0} : std::vector<double>{1.0, 0.5};
    });
    CHECK(classify_series(twice).regime == Regime::cycling);
}

TEST_CASE("noise around the threshold is not read as cycling (hysteresis)", "[regime]") {
    // Trait 1 alternates between 0.905 and 0.895 around 1 - eps = 0.9 at every output time.
    const auto s = series_of(2, 10, [](double t) {
        const bool up = static_cast<int>(std::lround(t * 10)) % 2 == 0;
        return std::vector<double>{1.0, up ? 0.905 : 0.895};
    });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::coexistence);
    CHECK(o.residents == std::vector<int>{0, 1});
    // Without the hysteresis band the same series would flicker into a "cycle".
    RegimeSettings none;
    none.hysteresis = 0.0;
    CHECK(classify_series(s, none).regime == Regime::cycling);
}

TEST_CASE("cycles only before the final window do not count", "[regime]") {
    const auto s = series_of(3, 20, [](double t) { return t < 12 ? rotating(t, 0.5) : std::vector<double>{0.2, 1.0, 0.3}; });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{1});
    // A window reaching back into the cycles sees them.
    RegimeSettings wide;
    wide.final_window = 0.9;
    CHECK(classify_series(s, wide).regime == Regime::cycling);
}

TEST_CASE("a population below the resident level is classified by its top traits", "[regime]") {
    // Nothing reaches 1 - eps: the reference is the top exponent (0.6), within eps of it: 0.55.
    const auto s = series_of(3, 10, [](double) { return std::vector<double>{0.6, 0.2, 0.55}; });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::coexistence);
    CHECK(o.residents == std::vector<int>{0, 2});
}

TEST_CASE("a run still in transition at its end is classified by where it got to", "[regime]") {
    // Trait 0 leads until t = 9.5, then trait 1 replaces it.
    const auto s = series_of(2, 10, [](double t) { return t < 9.5 ? std::vector<double>{1.0, 0.5} : std::vector<double>{0.6, 1.0}; });
    const Outcome o = classify_series(s);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{1});
}

TEST_CASE("residents are written x:y joined by semicolons in trait order", "[regime]") {
    const std::vector<std::string> names{"0:0", "0:2", "2:0", "2:2"};
    CHECK(residents_text({0, 3}, names) == "0:0;2:2");
    CHECK(residents_text({}, names).empty());
    CHECK(std::string(name_of(Regime::coexistence)) == "coexistence");
}

namespace {

LimitPhase phase(double start, double end, std::vector<int> residents) {
    LimitPhase p;
    p.start_t_logK = start;
    p.end_t_logK = end;
    p.end = PhaseEnd::invasion;
    for (int r : residents) p.residents.push_back({r, 1.0, 0.0});
    return p;
}

LimitPrediction prediction(std::vector<LimitPhase> phases, std::vector<double> final_exponents) {
    LimitPrediction p;
    p.phases = std::move(phases);
    p.phases.back().end = PhaseEnd::until;
    p.stopped_at = p.phases.back().end_t_logK;
    p.knot_t_logK = {0.0, p.stopped_at};
    p.knot_exponents = {final_exponents, final_exponents};
    return p;
}

}  // namespace

TEST_CASE("limit: the residents of the last phase decide", "[regime][limit]") {
    const auto one = prediction({phase(0, 2, {0}), phase(2, 10, {1})}, {0.0, 1.0, 0.5});
    Outcome o = classify_limit(one);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{1});
    CHECK(o.final_t_logK == 10.0);
    CHECK_FALSE(o.period);

    const auto two = prediction({phase(0, 2, {0}), phase(2, 10, {0, 2})}, {1.0, 0.3, 1.0});
    o = classify_limit(two);
    CHECK(o.regime == Regime::coexistence);
    CHECK(o.residents == std::vector<int>{0, 2});
}

TEST_CASE("limit: no resident and nothing alive is extinct, no resident but cells alive is not", "[regime][limit]") {
    const auto dead = prediction({phase(0, 3, {0}), phase(3, 10, {})}, {0.0, 0.0, 0.0});
    CHECK(classify_limit(dead).regime == Regime::extinct);
    CHECK(classify_limit(dead).residents.empty());

    const auto below = prediction({phase(0, 3, {0}), phase(3, 10, {})}, {0.3, 0.5, 0.0});
    const Outcome o = classify_limit(below);
    CHECK(o.regime == Regime::resident);
    CHECK(o.residents == std::vector<int>{1});
}

TEST_CASE("limit: a repeating sequence of resident sets is cycling with find_cycle's period", "[regime][limit]") {
    // The three-trait transfer cycle of model.md section 7: (0,0) -> (0,2) -> (0,4) -> (0,0),
    // every phase of length 1, repeated.
    std::vector<LimitPhase> phases;
    for (int k = 0; k < 7; ++k) phases.push_back(phase(k, k + 1, {k % 3}));
    const auto cycling = prediction(phases, {1.0, 0.5, 0.5});
    if (stub_limit()) {
        // find_cycle is part of the exponent limit, which is built on another branch; on this
        // branch it is a stub that never finds a cycle.
        WARN("SKIPPED: limit cycling classification needs find_cycle; " << *limit_not_applicable(Scenario{}));
        return;
    }
    const Outcome o = classify_limit(cycling);
    CHECK(o.regime == Regime::cycling);
    CHECK(o.residents == std::vector<int>{0, 1, 2});
    REQUIRE(o.period);
    CHECK(*o.period == Approx(3.0).margin(1e-9));
}
