// V14 (validation.md): the exponent limit against closed forms derived by hand from the
// invasion fitness. On the t / ln K scale a sub-population of K^beta0 cells growing at net
// rate f has exponent beta0 + f s until it reaches 1 or 0; mutation at probability K^-alpha
// puts a mutant of a parent at exponent beta_parent - alpha (the large-population picture
// with power-law mutation of Durrett & Mayberry 2011, Ann. Appl. Probab. 21:699-744; the
// fitness is the branching growth rate, Athreya & Ney 1972, Branching Processes). Every
// number below is derived in the comment next to it. Tolerance 1e-6 in exponent and time
// (the limit is exact up to event-arithmetic rounding of 1e-12 and the settling's 1e-11;
// validation.md asks for 1e-3); halving or doubling any rate moves each checked value by
// more than 0.05.
#include <catch2/catch.hpp>

#include <cmath>

#include "limit_support.hpp"

using namespace tessera;
using limittest::trait;

namespace {
constexpr double tol = 1e-6;

std::vector<int> resident_traits(const LimitPhase& p) {
    std::vector<int> t;
    for (const ResidentState& r : p.residents) t.push_back(r.trait);
    return t;
}
}  // namespace

TEST_CASE("V14: one invader, mutation off: fitness, time of reaching 1, decline and extinction of the old resident",
          "[limit][v14]") {
    // Traits (0, 0) and (2, 0); (2, 0) divides at 5 (override), no dormancy (p = 0), d = 1,
    // C = 1. Resident (0, 0) alone: n* = b - d = 3. Invader fitness 5 - 1 - 3 = 1, from
    // beta0 = log(1 + K^0.4) / ln K: reaches 1 at s1 = (1 - beta0) / 1 = 0.6. Then (2, 0)
    // alone: n* = 4, and (0, 0) declines at 4 - 1 - 4 = -1 from 1, reaching 0 at s1 + 1.
    Scenario s = limittest::scenario();
    s.dormancy_axis = {2.0, 2};
    RateOverride o = limittest::override_of(2.0, 0.0);
    o.birth = 5.0;
    s.rates.overrides = {o};
    s.inocula = {limittest::cells(s, 0, 0, 1.0), limittest::cells(s, 2, 0, 0.4)};
    s.until = 3.0;
    const LimitPrediction p = predict_limit(s);
    const int old = trait(s, 0, 0), invader = trait(s, 2, 0);
    REQUIRE(p.stop_reason.empty());
    REQUIRE(p.phases.size() == 2);
    const double beta0 = limittest::start_exponent(s, 0.4);
    const double s1 = (1.0 - beta0) / 1.0;
    CHECK(p.phases[0].fitness[static_cast<std::size_t>(invader)] == Approx(1.0).margin(tol));
    CHECK(p.phases[0].end == PhaseEnd::invasion);
    CHECK(p.phases[0].end_t_logK == Approx(s1).margin(tol));
    CHECK(p.phases[0].invaders == std::vector<int>{invader});
    CHECK(resident_traits(p.phases[1]) == std::vector<int>{invader});
    CHECK(p.phases[1].residents[0].active_density == Approx(4.0).margin(1e-9));
    CHECK(p.phases[1].fitness[static_cast<std::size_t>(old)] == Approx(-1.0).margin(tol));
    CHECK(p.phases[1].end == PhaseEnd::until);
    CHECK(p.exponent_at(invader, 0.3) == Approx(beta0 + 0.3).margin(tol));
    CHECK(p.exponent_at(old, s1 + 0.25) == Approx(0.75).margin(tol));
    CHECK(p.exponent_at(old, s1 + 0.999) == Approx(0.001).margin(tol));
    CHECK(p.exponent_at(old, s1 + 1.2) == 0.0);  // extinct, and nothing revives it
    CHECK(p.exponent_at(old, 3.0) == 0.0);
    CHECK(std::isnan(p.exponent_at(old, 3.5)));
}

TEST_CASE("V14: a mutation chain sits at 1 - k alpha for the k-th step", "[limit][v14]") {
    // Dormancy axis 0..4 in 5 levels, transfer off, p = 0: b = 4 - 0.5 x, so with (0, 0)
    // resident (n* = 3) the k-th step has fitness 4 - 0.5 k - 1 - 3 = -0.5 k < 0 and sits on
    // its mutation floor: 1 - k alpha, or 0 (extinct) once that is negative. alpha = 0.3:
    // 0.7, 0.4, 0.1, 0. The floors act at once (t / ln K = 0) and stay.
    Scenario s = limittest::scenario();
    s.dormancy_axis = {4.0, 5};
    s.rates.mutation_exponent = 0.3;
    s.inocula = {limittest::cells(s, 0, 0, 1.0)};
    s.until = 2.0;
    const LimitPrediction p = predict_limit(s);
    REQUIRE(p.stop_reason.empty());
    REQUIRE(p.phases.size() == 1);
    const double expected[] = {1.0, 0.7, 0.4, 0.1, 0.0};
    for (int k = 0; k < 5; ++k) {
        INFO("step " << k);
        CHECK(p.exponent_at(trait(s, k, 0), 0.0) == Approx(expected[k]).margin(tol));
        CHECK(p.exponent_at(trait(s, k, 0), 1.7) == Approx(expected[k]).margin(tol));
    }
    // With backward mutation the chain is also fed from above, which changes nothing here
    // (beta_{k+1} - alpha < beta_k), and forward mutation still acts.
    s.rates.mutation_backward = 0.5;
    const LimitPrediction q = predict_limit(s);
    for (int k = 0; k < 5; ++k) CHECK(q.exponent_at(trait(s, k, 0), 1.0) == Approx(expected[k]).margin(tol));
    // All backward: no forward mutant, so every other trait is extinct.
    s.rates.mutation_backward = 1.0;
    const LimitPrediction r = predict_limit(s);
    for (int k = 1; k < 5; ++k) CHECK(r.exponent_at(trait(s, k, 0), 1.0) == 0.0);
}

TEST_CASE("V14: the three-trait transfer cycle of model.md section 7, and its phase lengths", "[limit][v14]") {
    // Transfer axis 0, 2, 4 (b = 4, 3, 2), dormancy off, d = 1, C = 1, frequency form, whole
    // copies, alpha = 0.5. Resident y0 (n* = 3): f(y2) = 3 - 1 - 3 + tau = tau - 1,
    // f(y4) = tau - 2. Resident y2 (n* = 2): f(y0) = 1 - tau, f(y4) = tau - 1. Resident y4
    // (n* = 1): f(y0) = 2 - tau, f(y2) = 1 - tau. Mutation (forward only) floors: y2 >= y0 - alpha,
    // y4 >= y2 - alpha.
    Scenario s = limittest::scenario();
    s.transfer_axis = {4.0, 3};
    s.rates.mutation_exponent = 0.5;
    s.inocula = {limittest::cells(s, 0, 0, 1.0)};
    s.until = 20.0;
    const int y0 = trait(s, 0, 0), y2 = trait(s, 0, 2), y4 = trait(s, 0, 4);

    SECTION("tau = 1.5: every phase has length exactly 1, period 3 (model.md's checked example)") {
        // Each invader starts at 1 - alpha = 0.5 with fitness 0.5, each leaver falls at -0.5
        // for one phase to 0.5 and then rises at 0.5.
        s.rates.transfer = 1.5;
        const LimitPrediction p = predict_limit(s);
        REQUIRE(p.stop_reason.empty());
        REQUIRE(p.phases.size() >= 9);
        const int order[3] = {y0, y2, y4};
        for (std::size_t k = 0; k + 1 < p.phases.size(); ++k) {
            INFO("phase " << k);
            CHECK(resident_traits(p.phases[k]) == std::vector<int>{order[k % 3]});
            CHECK(p.phases[k].end_t_logK - p.phases[k].start_t_logK == Approx(1.0).margin(tol));
        }
        const auto c = find_cycle(p);
        REQUIRE(c);
        CHECK(c->first_phase == 0);
        CHECK(c->length == 3);
        CHECK(c->period == Approx(3.0).margin(tol));
        CHECK(c->repeats >= 5);
    }
    SECTION("tau = 1.6: a first cycle 5/6, 5/6, 5/4, then phase lengths 5/6, 5/9, 5/6, period 20/9") {
        // First cycle. Phase A (y0 resident): y2 starts on its floor 1 - alpha = 1/2 and rises
        // at 0.6: L_A = 0.5 / 0.6 = 5/6; y4 (absent) follows its floor y2 - 1/2 from 0 to 1/2.
        // Phase B (y2): y4 rises at 0.6 from 1/2: L_B = 5/6; y0 falls at -0.6 to 1/2. Phase C
        // (y4): y0 rises at 0.4 from 1/2: L_C = 5/4; y2 falls from 1 at -0.6 and meets its
        // floor y0 - 1/2 (rising at 0.4 from 0) after 1, at 0.4, then follows it to 1/2.
        // From then on: phase A: L_A = 5/6 again, while y4 falls from 1 at -0.4 to
        // 1 - 0.4 * 5/6 = 2/3 (above its floor). Phase B: y4 rises at 0.6 from 2/3:
        // L_B = (1/3) / 0.6 = 5/9; y0 falls at -0.6 to 1 - 0.6 * 5/9 = 2/3. Phase C: y0 rises at
        // 0.4 from 2/3: L_C = (1/3) / 0.4 = 5/6; y2 falls at -0.6 to 1 - 0.6 * 5/6 = 1/2, just
        // where phase A began.
        s.rates.transfer = 1.6;
        const LimitPrediction p = predict_limit(s);
        REQUIRE(p.stop_reason.empty());
        REQUIRE(p.phases.size() >= 12);
        const double first[3] = {5.0 / 6.0, 5.0 / 6.0, 5.0 / 4.0};
        const double length[3] = {5.0 / 6.0, 5.0 / 9.0, 5.0 / 6.0};
        for (std::size_t k = 0; k + 1 < p.phases.size(); ++k) {
            INFO("phase " << k);
            CHECK(p.phases[k].end_t_logK - p.phases[k].start_t_logK ==
                  Approx(k < 3 ? first[k] : length[k % 3]).margin(tol));
        }
        CHECK(p.phases[0].fitness[static_cast<std::size_t>(y2)] == Approx(0.6).margin(tol));
        CHECK(p.phases[0].fitness[static_cast<std::size_t>(y4)] == Approx(-0.4).margin(tol));
        CHECK(p.exponent_at(y4, 5.0 / 6.0) == Approx(0.5).margin(tol));
        CHECK(p.exponent_at(y2, 5.0 / 3.0 + 1.0) == Approx(0.4).margin(tol));
        CHECK(p.exponent_at(y4, 5.0 / 3.0 + 5.0 / 4.0 + 5.0 / 6.0) == Approx(2.0 / 3.0).margin(tol));
        // The first cycle is a transient: the cycle found starts at phase 3.
        const auto c = find_cycle(p);
        REQUIRE(c);
        CHECK(c->first_phase == 3);
        CHECK(c->length == 3);
        CHECK(c->period == Approx(20.0 / 9.0).margin(tol));
    }
}

TEST_CASE("V14: transfer_only copies join traits that feed each other into one class", "[limit][v14]") {
    // Traits x in {0, 4}, y in {0, 2}; the two recipients (0, 0) and (4, 0) are identical
    // (overrides: birth 4) and neutral residents at n* = 3, 1.5 each (they start equal). The
    // two donors (0, 2) and (4, 2) divide at 3. With transfer_only, donor (4, 2) meeting
    // recipient (0, 0) makes (0, 2) and donor (0, 2) meeting (4, 0) makes (4, 2): they feed
    // each other. Jacobian of the donors (tau = 1.5, each resident a fraction 1/2 of n):
    //   [[-1 + 0.75, 0.75], [0.75, -1 + 0.75]],  leading eigenvalue 0.5 (eigenvector (1, 1)),
    // where each donor alone would have -0.25. So both rise at 0.5 from the larger start
    // (0.5: (0, 2) at K^0.5, (4, 2) absent and raised to it at once) and reach 1 together at
    // t / ln K = 1, one invasion and no tie.
    Scenario s = limittest::scenario();
    s.dormancy_axis = {4.0, 2};
    s.transfer_axis = {2.0, 2};
    s.rates.transfer = 1.5;
    s.rates.transfer_copies = TransferCopies::transfer_only;
    s.rates.birth_cost_transfer = 0.5;  // b(0, 2) = 3
    RateOverride r = limittest::override_of(4.0, 0.0), d = limittest::override_of(4.0, 2.0);
    r.birth = 4.0;
    d.birth = 3.0;
    s.rates.overrides = {r, d};
    Inoculum half0 = limittest::cells(s, 0, 0, 1.0), half4 = limittest::cells(s, 4, 0, 1.0);
    half0.active = 0.5 * s.K;
    half4.active = 0.5 * s.K;
    s.inocula = {half0, half4, limittest::cells(s, 0, 2, 0.5)};
    s.until = 1.5;
    const LimitPrediction p = predict_limit(s);
    const int d0 = trait(s, 0, 2), d4 = trait(s, 4, 2);
    REQUIRE(!p.phases.empty());
    CHECK(p.phases[0].residents.size() == 2);
    CHECK(p.phases[0].fitness[static_cast<std::size_t>(d0)] == Approx(0.5).margin(tol));
    CHECK(p.phases[0].fitness[static_cast<std::size_t>(d4)] == Approx(0.5).margin(tol));
    const double beta0 = limittest::start_exponent(s, 0.5);
    CHECK(p.exponent_at(d4, 0.0) == Approx(beta0).margin(tol));
    CHECK(p.exponent_at(d4, 0.5) == Approx(beta0 + 0.25).margin(tol));
    CHECK(p.phases[0].end == PhaseEnd::invasion);
    CHECK(p.phases[0].end_t_logK == Approx((1 - beta0) / 0.5).margin(tol));
    CHECK(p.phases[0].invaders == std::vector<int>{d0, d4});
}

TEST_CASE("V14: a schedule in t / ln K changes the conditions piecewise", "[limit][v14]") {
    // One trait (0, 0), b = 4, d = 1. Stress 4 in [1, 1.5): b - d - s = -1, so the resident
    // cannot stay: it falls from 1 at -1 to 0.5 at 1.5. Then, alone and below K, it grows at
    // b - d = 3 (no competition on that scale) and is back at 1 at 1.5 + 0.5 / 3.
    Scenario s = limittest::scenario();
    s.inocula = {limittest::cells(s, 0, 0, 1.0)};
    Schedule pulse;
    pulse.habitat = s.habitats[0].name;
    pulse.start = 1.0;
    pulse.end = 1.5;
    pulse.stress = 4.0;
    s.schedules = {pulse};
    s.until = 3.0;
    REQUIRE(!limit_not_applicable(s));
    const LimitPrediction p = predict_limit(s);
    REQUIRE(p.stop_reason.empty());
    REQUIRE(p.phases.size() == 4);
    CHECK(p.phases[0].end == PhaseEnd::schedule);
    CHECK(p.phases[0].end_t_logK == Approx(1.0).margin(tol));
    CHECK(p.phases[0].residents[0].active_density == Approx(3.0).margin(1e-9));
    CHECK(p.phases[1].residents.empty());
    CHECK(p.phases[1].end == PhaseEnd::schedule);
    CHECK(p.phases[1].end_t_logK == Approx(1.5).margin(tol));
    CHECK(p.exponent_at(0, 1.25) == Approx(0.75).margin(tol));
    CHECK(p.phases[2].end == PhaseEnd::invasion);
    CHECK(p.phases[2].end_t_logK == Approx(1.5 + 0.5 / 3.0).margin(tol));
    CHECK(p.phases[3].residents.size() == 1);
    CHECK(p.phases[3].end == PhaseEnd::until);
    // A stress that kills for good: the last phase has no resident and nothing can grow.
    s.schedules[0].end = 10.0;
    const LimitPrediction q = predict_limit(s);
    REQUIRE(!q.phases.empty());
    CHECK(q.phases.back().end == PhaseEnd::no_resident);
    CHECK(q.exponent_at(0, 2.5) == 0.0);
    CHECK(q.exponent_at(0, 1.5) == Approx(0.5).margin(tol));
}

TEST_CASE("V14: where the hypotheses fail the limit stops and says why", "[limit][v14]") {
    // Two different traits with the same fitness from the same start reach 1 together: a tie.
    // (2, 0) and (0, 2) both divide at 5 (overrides), transfer off: fitness 5 - 1 - 3 = 1
    // each, both from log(1 + K^0.5) / ln K, both at 1 at t / ln K = 1 - beta0.
    Scenario s = limittest::scenario();
    s.dormancy_axis = {2.0, 2};
    s.transfer_axis = {2.0, 2};
    RateOverride a = limittest::override_of(2.0, 0.0), b = limittest::override_of(0.0, 2.0);
    a.birth = 5.0;
    b.birth = 5.0;
    s.rates.overrides = {a, b};
    s.inocula = {limittest::cells(s, 0, 0, 1.0), limittest::cells(s, 2, 0, 0.5), limittest::cells(s, 0, 2, 0.5)};
    const LimitPrediction p = predict_limit(s);
    const double at = 1.0 - limittest::start_exponent(s, 0.5);
    REQUIRE(p.phases.size() == 1);
    CHECK(p.phases[0].end == PhaseEnd::tie);
    CHECK(p.stopped_at == Approx(at).margin(tol));
    CHECK_THAT(p.stop_reason, Catch::Matchers::Contains("t/lnK = 0.5") && Catch::Matchers::Contains("(2, 0)") &&
                                  Catch::Matchers::Contains("(0, 2)"));
    CHECK(std::isnan(p.exponent_at(trait(s, 2, 0), at + 0.1)));
    CHECK(p.exponent_at(trait(s, 2, 0), at) == Approx(1.0).margin(tol));
    // One of them a little faster: no tie, it invades.
    s.rates.overrides[1].birth = 4.9;
    const LimitPrediction q = predict_limit(s);
    REQUIRE(!q.phases.empty());
    CHECK(q.phases[0].end == PhaseEnd::invasion);
    CHECK(q.phases[0].invaders == std::vector<int>{trait(s, 2, 0)});
}

TEST_CASE("limit_not_applicable names the key at fault", "[limit]") {
    Scenario s = limittest::scenario();
    CHECK(!limit_not_applicable(s));
    Scenario lattice = s;
    lattice.width = 3;
    lattice.habitat_of_patch.assign(3, 0);
    REQUIRE(limit_not_applicable(lattice));
    CHECK_THAT(*limit_not_applicable(lattice), Catch::Matchers::Contains("lattice.width"));
    Scenario plain = s;
    plain.time_unit = TimeUnit::plain;
    CHECK(!limit_not_applicable(plain));  // plain time is fine without schedules
    Schedule sc;
    sc.habitat = s.habitats[0].name;
    sc.start = 1;
    sc.end = 2;
    sc.stress = 1;
    plain.schedules = {sc};
    REQUIRE(limit_not_applicable(plain));
    CHECK_THAT(*limit_not_applicable(plain), Catch::Matchers::Contains("schedule[1]") &&
                                                 Catch::Matchers::Contains("run.time_unit = \"logK\""));
    Scenario every = s;
    every.rates.mutation_exponent = 0.0;
    CHECK(limit_not_applicable(every));
}

TEST_CASE("V14: below exponent 1 frequency-dependent transfer acts among the dominant traits", "[limit][v14]") {
    // No resident: competition vanishes (N / K -> 0), but the frequency form tau A_j A_k / N
    // stays of order one between the traits at the top exponent and the rest. Transfer axis
    // 0, 2 (b = 4, 3), d = 1, dormancy and mutation off.
    Scenario s = limittest::scenario();
    s.transfer_axis = {2.0, 2};
    const int y0 = trait(s, 0, 0), y2 = trait(s, 0, 2);
    SECTION("the top trait converts the donor's partners: the donor gains tau") {
        // (0, 0) at 0.5 dominates and grows at b - d = 3; the donor (0, 2) at 0.3 grows at
        // 3 - 1 + tau = 3.5 (all its partners are (0, 0)). (0, 0) reaches 1 at 1/6, the donor
        // is then at 0.3 + 3.5 / 6; with (0, 0) resident (n* = 3) it grows at 3 - 1 - 3 + 1.5 =
        // 0.5 and reaches 1 at 1/6 + (0.7 - 3.5 / 6) / 0.5.
        s.rates.transfer = 1.5;
        s.inocula = {limittest::cells(s, 0, 0, 0.5), limittest::cells(s, 0, 2, 0.3)};
        const LimitPrediction p = predict_limit(s);
        REQUIRE(p.phases.size() >= 2);
        const double b0 = limittest::start_exponent(s, 0.5), b2 = limittest::start_exponent(s, 0.3);
        const double s1 = (1 - b0) / 3.0;
        CHECK(p.phases[0].fitness[static_cast<std::size_t>(y2)] == Approx(3.5).margin(tol));
        CHECK(p.phases[0].end_t_logK == Approx(s1).margin(tol));
        CHECK(p.exponent_at(y2, s1) == Approx(b2 + 3.5 * s1).margin(tol));
        CHECK(p.phases[1].end_t_logK == Approx(s1 + (1 - b2 - 3.5 * s1) / 0.5).margin(tol));
        CHECK(p.phases[1].invaders == std::vector<int>{y2});
    }
    SECTION("a donor catching up joins the mix and takes it over") {
        // tau = 3: (0, 0) at 0.2 grows at 3, the donor at 0.1 at 3 - 1 + 3 = 5: they meet at
        // s = 0.05, exponent 0.35. In the mix the donor's share f follows
        // df/dt = f (1 - f) (2 - 3 + tau) = 2 f (1 - f) -> 1, so the mix is the donor alone,
        // growing at 2; (0, 0), converted at rate tau, has 3 - 3 = 0 and stays at 0.35. The
        // donor reaches 1 at 0.05 + 0.65 / 2.
        s.rates.transfer = 3.0;
        s.inocula = {limittest::cells(s, 0, 0, 0.2), limittest::cells(s, 0, 2, 0.1)};
        const LimitPrediction p = predict_limit(s);
        REQUIRE(!p.phases.empty());
        const double b0 = limittest::start_exponent(s, 0.2), b2 = limittest::start_exponent(s, 0.1);
        const double meet = (b0 - b2) / 2.0, level = b0 + 3.0 * meet;
        CHECK(p.exponent_at(y0, meet) == Approx(level).margin(tol));
        CHECK(p.exponent_at(y0, meet + 0.2) == Approx(level).margin(tol));
        CHECK(p.exponent_at(y2, meet + 0.2) == Approx(level + 0.4).margin(tol));
        CHECK(p.phases[0].end == PhaseEnd::invasion);
        CHECK(p.phases[0].end_t_logK == Approx(meet + (1 - level) / 2.0).margin(tol));
        CHECK(p.phases[0].invaders == std::vector<int>{y2});
    }
}

TEST_CASE("V14: a deterministic limit without equilibrium stops the prediction at once", "[limit][v14]") {
    // One trait whose every competition encounter makes a cell dormant (q = 1) and whose
    // dormant cells never die (kappa = 0): d(a + z)/dt = (b - d) a > 0 for ever, so the
    // dormant pool grows without bound and no equilibrium exists. density_max is lowered so
    // the test stops in milliseconds (the reason is the same at the default).
    Scenario s = limittest::scenario();
    RateOverride o = limittest::override_of(0.0, 0.0);
    o.dormancy_probability = 1.0;
    s.rates.overrides = {o};
    s.rates.dormant_death = 0.0;
    s.inocula = {limittest::cells(s, 0, 0, 1.0)};
    LimitSettings settings;
    settings.density_max = 100.0;
    const LimitPrediction p = predict_limit(s, settings);
    REQUIRE(p.phases.size() == 1);
    CHECK(p.phases[0].end == PhaseEnd::no_equilibrium);
    CHECK(p.stopped_at == 0.0);
    CHECK_THAT(p.stop_reason, Catch::Matchers::Contains("t/lnK = 0") && Catch::Matchers::Contains("no equilibrium") &&
                                  Catch::Matchers::Contains("grows past 100"));
    CHECK(p.exponent_at(0, 0.0) == 1.0);
    CHECK(std::isnan(p.exponent_at(0, 0.5)));
}
