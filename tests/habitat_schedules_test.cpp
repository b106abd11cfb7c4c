// Schedules switch habitat properties on and off at the right times (model.md section 3,
// interfaces.md [[schedule]]): windows are [start, end), repeat every `every`, are written
// in run.time_unit, and the engine ends a step at every switch so that a change applies
// from its exact time.
//
// The engine check runs two patches without migration, one of which is "treated" with a
// stress of 20 during [0.5, 0.6) plain, repeating every 2. Inside a window the treated
// patch loses at rate about 20, so 63% of it every 0.05 (at least half is checked); a
// window takes it from N to about 0.14 N and the 1.9 units between windows bring it back
// to about 0.5 K (r = 1), so it never falls below about 500 of K = 1e4. Outside the
// windows it grows by about 5% per 0.05 (at least -10% is checked; its fluctuation over
// 0.05 is below 2% at 500 cells); the untreated patch at K fluctuates by 0.5% (at least
// -5% is checked). Every margin is 7 or more standard deviations at every point, so these
// are deterministic checks in effect.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <vector>

#include "core/habitat_timeline.hpp"
#include "spatial_support.hpp"

using namespace tessera;
using namespace tessera::spatial;

namespace {

const Habitat open_class{"open", ".", "#d8d8d8", 1.0, 0.0, 1.0, 1.0};
const Habitat treated_class{"treated", "T", "#8fa8d8", 1.0, 0.0, 1.0, 1.0};

Schedule pulse(double start, double end, double every, double stress) {
    Schedule s;
    s.habitat = "treated";
    s.start = start;
    s.end = end;
    s.every = every;
    s.stress = stress;
    return s;
}

Scenario two_classes() {
    Scenario s = quiet_lattice(2, 1);
    s.habitats = {open_class, treated_class};
    s.habitat_of_patch = {0, 1};
    return s;
}

}  // namespace

TEST_CASE("a one-off window is on in [start, end) only", "[space][schedule]") {
    Scenario s = two_classes();
    Schedule w = pulse(2.0, 3.0, 0.0, 5.0);
    w.permeability = 0.25;
    s.schedules = {w};
    const HabitatTimeline timeline(s);
    CHECK(timeline.at(1.999)[1].stress == 0.0);
    CHECK(timeline.at(2.0)[1].stress == 5.0);
    CHECK(timeline.at(2.0)[1].permeability == 0.25);
    CHECK(timeline.at(2.0)[1].capacity == 1.0);  // not named: unchanged
    CHECK(timeline.at(2.999)[1].stress == 5.0);
    CHECK(timeline.at(3.0)[1].stress == 0.0);
    CHECK(timeline.at(2.5)[0].stress == 0.0);  // the other class is never touched
    CHECK(timeline.next_change_after(0.0) == 2.0);
    CHECK(timeline.next_change_after(2.0) == 3.0);
    CHECK(timeline.next_change_after(2.5) == 3.0);
    CHECK(timeline.next_change_after(3.0) == std::numeric_limits<double>::infinity());
}

TEST_CASE("a repeating window recurs every period", "[space][schedule]") {
    Scenario s = two_classes();
    s.schedules = {pulse(1.0, 1.5, 4.0, 3.0)};
    const HabitatTimeline timeline(s);
    for (int k = 0; k < 5; ++k) {
        const double on = 1.0 + 4.0 * k;
        INFO("repetition " << k);
        CHECK(timeline.at(on - 0.01)[1].stress == 0.0);
        CHECK(timeline.at(on)[1].stress == 3.0);
        CHECK(timeline.at(on + 0.49)[1].stress == 3.0);
        CHECK(timeline.at(on + 0.5)[1].stress == 0.0);
        CHECK(timeline.next_change_after(on - 0.01) == Approx(on));
        CHECK(timeline.next_change_after(on) == Approx(on + 0.5));
        CHECK(timeline.next_change_after(on + 0.5) == Approx(on + 4.0));
    }
    CHECK(timeline.at(0.5)[1].stress == 0.0);  // nothing before the first start
}

TEST_CASE("schedule times are in run.time_unit: t / ln K by default", "[space][schedule]") {
    Scenario s = two_classes();
    s.time_unit = TimeUnit::logK;
    s.K = 1e4;
    s.schedules = {pulse(1.0, 1.5, 2.0, 3.0)};
    const double lnK = std::log(1e4);
    const HabitatTimeline timeline(s);
    CHECK(timeline.at(0.99 * lnK)[1].stress == 0.0);
    CHECK(timeline.at(1.01 * lnK)[1].stress == 3.0);
    CHECK(timeline.at(1.51 * lnK)[1].stress == 0.0);
    CHECK(timeline.at(3.2 * lnK)[1].stress == 3.0);
    CHECK(timeline.next_change_after(0.0) == Approx(lnK));
}

TEST_CASE("overlapping windows: a later schedule wins while both are on", "[space][schedule]") {
    Scenario s = two_classes();
    s.schedules = {pulse(1.0, 3.0, 0.0, 2.0), pulse(2.0, 4.0, 0.0, 7.0)};
    const HabitatTimeline timeline(s);
    CHECK(timeline.at(1.5)[1].stress == 2.0);
    CHECK(timeline.at(2.5)[1].stress == 7.0);
    CHECK(timeline.at(3.5)[1].stress == 7.0);
    CHECK(timeline.at(4.0)[1].stress == 0.0);
}

TEST_CASE("a pulsed stress kills only inside its windows", "[space][schedule]") {
    Scenario s = two_classes();
    s.K = 1e4;
    s.rates.birth_max = 2.0;
    s.rates.death = 1.0;
    s.rates.competition = 1.0;
    s.inocula = {cells_at(0, 0, 1e4), cells_at(1, 0, 1e4)};
    s.schedules = {pulse(0.5, 0.6, 2.0, 20.0)};
    s.method = Method::auto_select;
    s.sync = 0.02;  // windows need not fall on step ends: the engine stops at each switch
    s.seed = validation::test_seed(1301);
    Engine e(s);
    const double dt = 0.05;
    std::int64_t before[2] = {active_in(e, 0), active_in(e, 1)};
    int inside_seen = 0;
    for (int k = 1; k <= 120; ++k) {
        const double t0 = (k - 1) * dt;
        e.advance_to(k * dt);
        const std::int64_t now[2] = {active_in(e, 0), active_in(e, 1)};
        const double phase = std::fmod(t0 + 1e-9, 2.0);
        const bool inside = phase >= 0.5 - 1e-9 && phase < 0.6 - 1e-9;
        INFO("from t = " << t0 << (inside ? " (inside a window)" : "") << ": treated " << before[1] << " -> "
                         << now[1] << ", open " << before[0] << " -> " << now[0]);
        CHECK(now[0] >= 0.95 * static_cast<double>(before[0]));
        if (inside) {
            ++inside_seen;
            CHECK(now[1] <= 0.5 * static_cast<double>(before[1]));
        } else {
            CHECK(now[1] >= 0.9 * static_cast<double>(before[1]));
        }
        before[0] = now[0];
        before[1] = now[1];
    }
    CHECK(inside_seen == 6);  // two intervals in each of the 3 windows
}
