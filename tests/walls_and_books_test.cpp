// Walls block and the books balance (model.md section 3; style.md "totals balance").
//
// - A wall (capacity 0) never holds a cell: a jump towards it is cancelled, so no cell
//   ever enters it and cells beside it stay where they are.
// - With every local mechanism on, migration of active and dormant cells and absorbing
//   edges, the cells present always equal
//       cells at t = 0 + births - deaths - competition deaths - dormant deaths - lost
//   (dormancy, resuscitation, conjugation and migration move cells, they do not make or
//   destroy them), for the split engine with exact and leaping local phases and for the
//   exact spatial engine. These are exact identities: no tolerance.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "spatial_support.hpp"

using namespace tessera;
using namespace tessera::spatial;

namespace {

// (name, symbol, colour, capacity, stress, resuscitation, permeability); aggregate
// initialisation because assigning strings trips GCC 12's false -Wrestrict.
const Habitat open_class{"open", ".", "#d8d8d8", 1.0, 0.0, 1.0, 1.0};
const Habitat wall_class{"wall", "#", "#303030", 0.0, 0.0, 1.0, 1.0};
const Habitat harsh_class{"harsh", "h", "#c04040", 0.5, 1.5, 0.5, 2.0};

// Checks the walls and the books at every output time.
struct Auditor : Observer {
    std::int64_t start = -1;
    std::vector<std::size_t> walls;
    std::vector<std::string> problems;
    int looks = 0;

    void observe(const Engine& e, unsigned) override {
        ++looks;
        const std::int64_t now = cells(e);
        if (start < 0) start = now;
        const EventCounts c = e.totals();
        const std::int64_t balance = start + static_cast<std::int64_t>(c.births) -
                                     static_cast<std::int64_t>(c.deaths + c.competition_deaths + c.dormant_deaths) -
                                     static_cast<std::int64_t>(e.lost());
        if (balance != now) {
            problems.push_back("t = " + std::to_string(e.time()) + ": books give " + std::to_string(balance) +
                               ", lattice holds " + std::to_string(now));
        }
        for (std::size_t p : walls) {
            if (active_in(e, p) != 0 || dormant_in(e, p) != 0) {
                problems.push_back("t = " + std::to_string(e.time()) + ": wall patch " + std::to_string(p) + " holds cells");
            }
        }
    }
};

// 6 x 4 with a wall that leaves a gap, a harsh corner, absorbing edges:
//   . . # . . h
//   . . # . . h
//   . . # . . .
//   . . . . . .
Scenario busy_map(Method method, double K) {
    Scenario s;
    s.K = K;
    s.width = 6;
    s.height = 4;
    s.neighbourhood = 8;
    s.boundary = Boundary::absorbing;
    s.habitats = {open_class, wall_class, harsh_class};
    s.habitat_of_patch.assign(24, 0);
    for (int row = 0; row < 3; ++row) s.habitat_of_patch[static_cast<std::size_t>(row * 6 + 2)] = 1;
    s.habitat_of_patch[5] = s.habitat_of_patch[11] = 2;
    s.rates.dormancy_probability = 0.2;
    s.rates.dormant_death = 0.1;
    s.rates.transfer = 3.0;
    s.rates.mutation_exponent = 0.3;
    s.rates.mutation_backward = 0.2;
    s.rates.migration = 0.8;
    s.rates.migration_dormant = 0.2;
    Inoculum in;  // everywhere: the loader's default, walls are skipped
    in.exponent = 1.0;
    in.dormant = 5;
    s.inocula = {in};
    s.method = method;
    s.time_unit = TimeUnit::plain;
    s.until = 3.0;
    s.output_every = 0.25;
    s.fields_every = 0.0;
    s.sync = 0.05;
    s.seed = 77;
    return s;
}

}  // namespace

TEST_CASE("walls stay empty and the books balance with absorbing edges", "[space][walls]") {
    struct Case {
        Method method;
        double K;
        const char* name;
    };
    for (const Case c : {Case{Method::exact, 200, "split, exact local"}, Case{Method::auto_select, 2e5, "split, leaping"},
                         Case{Method::leap, 5e3, "split, leap"}, Case{Method::exact_spatial, 200, "exact spatial"}}) {
        INFO(c.name);
        Scenario s = busy_map(c.method, c.K);
        Engine e(s);
        Auditor audit;
        audit.walls = {2, 8, 14};
        e.run(audit);
        CHECK(audit.looks == 13);
        for (const std::string& p : audit.problems) FAIL_CHECK(p);
        CHECK(e.lost() > 0);          // the absorbing edges did take cells
        CHECK(e.migrants() > 0);
        CHECK(e.totals().births > 0);
        CHECK(cells(e) > 0);
    }
}

TEST_CASE("cells beside a wall stay: jumps towards it are cancelled", "[space][walls]") {
    // 3 x 1: open | wall | open, reflecting, migration only. From patch 0 every jump is
    // towards the wall or off the lattice, so all cells stay; patch 2 never gets any.
    for (Method method : {Method::exact, Method::exact_spatial}) {
        for (int k : {4, 8}) {
            INFO("neighbourhood " << k << (method == Method::exact ? ", split" : ", exact spatial"));
            Scenario s = quiet_lattice(3, 1);
            s.neighbourhood = k;
            s.habitats = {open_class, wall_class};
            s.habitat_of_patch = {0, 1, 0};
            s.rates.migration = 5.0;
            s.rates.migration_dormant = 5.0;
            s.inocula = {cells_at(0, 0, 300, 100)};
            s.method = method;
            s.sync = 0.1;
            Engine e(s);
            e.advance_to(4.0);
            CHECK(active_in(e, 0) == 300);
            CHECK(dormant_in(e, 0) == 100);
            CHECK(cells(e) == 400);
            CHECK(e.migrants() == 0);
            CHECK(e.lost() == 0);
        }
    }
}

TEST_CASE("a wall with a diagonal gap passes cells only with the 8-neighbourhood", "[space][walls]") {
    // 2 x 2: the cells start top-left; top-right and bottom-left are walls. Only a diagonal
    // jump reaches bottom-right.
    for (Method method : {Method::exact, Method::exact_spatial}) {
        for (int k : {4, 8}) {
            Scenario s = quiet_lattice(2, 2);
            s.neighbourhood = k;
            s.habitats = {open_class, wall_class};
            s.habitat_of_patch = {0, 1, 1, 0};
            s.rates.migration = 2.0;
            s.inocula = {cells_at(0, 0, 200)};
            s.method = method;
            s.sync = 0.1;
            Engine e(s);
            e.advance_to(2.0);
            INFO("neighbourhood " << k);
            CHECK(active_in(e, 1) == 0);
            CHECK(active_in(e, 2) == 0);
            CHECK(cells(e) == 200);
            if (k == 4) CHECK(active_in(e, 3) == 0);
            if (k == 8) CHECK(active_in(e, 3) > 0);  // P(none crossed) is about e^-100
        }
    }
}
