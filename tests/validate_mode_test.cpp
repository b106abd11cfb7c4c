// The validate mode's checks (docs/reliability.md "Validate mode"): the exact engine's kept
// sums against a recomputation, the step books, and their messages (seed, replicate, patch,
// step and the re-run recipe). The checks are plain functions, tested in every build; a
// TESSERA_VALIDATE build also runs them after every step of the engine runs below.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "core/engine.hpp"
#include "core/exact_patch.hpp"
#include "core/lattice.hpp"
#include "core/rate_table.hpp"
#include "core/rng.hpp"
#include "core/step_validator.hpp"
#include "core/trait_grid.hpp"
#include "io/scenario_loader.hpp"

using namespace tessera;

TEST_CASE("the exact engine's kept sums agree with a recomputation, and a count changed behind its back shows") {
    // Trait-dependent death and competition, so that every kept floating sum is in play.
    const Scenario s = parse_scenario(
        "[rates]\nmutation_exponent = 0.2\n[[rates.override]]\ntrait = [2.0, 2.0]\ndeath = 0.3\ncompetition = 2.5\n"
        "[scale]\nK = 200\n",
        "sums.toml");
    const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
    const RateTable rates(grid, s.rates, s.K);
    ExactPatch patch(grid, rates, s.K);
    std::vector<std::int64_t> active(static_cast<std::size_t>(grid.size()), 20), dormant(active.size(), 5);
    const PatchConditions where;
    Rng rng({7, 0, 0}, 0, Phase::local);
    EventCounts counts;
    patch.attach(active.data(), dormant.data(), where);
    CHECK(patch.check_kept_sums().empty());
    for (int e = 0; e < 20000; ++e) patch.fire(rng, counts);
    CHECK(counts.events() > 0);
    CHECK(counts.conjugations > 0);
    CHECK(patch.check_kept_sums().empty());
    patch.add_active(4, +3);  // through the engine: followed
    CHECK(patch.check_kept_sums().empty());

    active[4] += 1;  // behind its back: the kept sums are stale now
    const std::string problem = patch.check_kept_sums();
    CHECK_THAT(problem, Catch::Contains("active cells kept"));
    CHECK_THAT(problem, Catch::Contains("birth sum"));
}

TEST_CASE("the step books: balanced steps pass, unbalanced ones name seed, replicate, patch and step") {
    Lattice lattice(3, 2, 2);
    std::vector<EventCounts> counts(lattice.patches());
    lattice.active(0)[0] = 10;
    lattice.dormant(4)[1] = 3;
    StepValidator v("maps/x/scenario.toml", 42, 2);

    // A birth in patch 0, a dormant death in patch 4, a cell moving from patch 0 to 1 and one
    // lost from patch 4 over an absorbing edge.
    v.before(lattice, counts, 0, 17, 1.5, 1.6);
    lattice.active(0)[1] += 1;
    ++counts[0].births;
    lattice.dormant(4)[1] -= 1;
    ++counts[4].dormant_deaths;
    lattice.active(0)[0] -= 1;
    lattice.active(1)[0] += 1;
    lattice.dormant(4)[1] -= 1;
    std::vector<std::uint64_t> out(lattice.patches(), 0), in(lattice.patches(), 0), lost(lattice.patches(), 0);
    out[0] = 1;
    in[1] = 1;
    lost[4] = 1;
    const MigrationBooks books{&out, &in, &lost};
    CHECK_NOTHROW(v.after(lattice, counts, 1, &books, true));

    // The same without the per-patch migration books: only the lattice's total can balance.
    v.before(lattice, counts, 1, 18, 1.6, 1.7);
    lattice.active(0)[0] -= 1;
    lattice.active(3)[0] += 1;
    CHECK_NOTHROW(v.after(lattice, counts, 1, nullptr, false));

    // A cell from nowhere in patch 5 (X=2, Y=1).
    v.before(lattice, counts, 1, 19, 1.7, 1.8);
    lattice.active(5)[1] += 1;
    try {
        v.after(lattice, counts, 1, nullptr, true);
        FAIL("an unbalanced step passed");
    } catch (const ValidationFailure& e) {
        const std::string m = e.what();
        CHECK_THAT(m, Catch::Contains("validate: step 19"));
        CHECK_THAT(m, Catch::Contains("seed 42, replicate 2, patch 5 (X=2, Y=1)"));
        CHECK_THAT(m, Catch::Contains("the books do not balance"));
        CHECK_THAT(m, Catch::Contains("TESSERA_STOP_AFTER_STEP=19 tessera run maps/x/scenario.toml --seed 42 --replicates 3"));
    }

    // A negative count.
    v.before(lattice, counts, 1, 20, 1.8, 1.9);
    lattice.dormant(3)[0] = -1;
    ++counts[3].deaths;  // balance the books: only the sign is wrong
    lattice.active(3)[0] += 0;
    CHECK_THROWS_WITH(v.after(lattice, counts, 1, nullptr, false), Catch::Contains("a count is negative"));

    CHECK_THROWS_WITH(v.kept_sums("birth sum kept 1, recomputed 2", 3, 3),
                      Catch::Contains("patch 3 (X=0, Y=1): the exact engine's kept sums differ"));
    CHECK_NOTHROW(v.kept_sums("", 3, 3));
}

namespace {

struct NoOutput : Observer {
    void observe(const Engine&, unsigned) override {}
};

}  // namespace

// In a TESSERA_VALIDATE build every step below is checked; elsewhere these are short runs.
TEST_CASE("every method keeps its books on a lattice with walls, migration and an absorbing edge") {
    const std::string text = R"(
[rates]
mutation_exponent = 0.3
migration = 0.5
migration_dormant = 0.1
dormant_death = 0.05
[scale]
K = 60
[lattice]
width = 4
height = 3
boundary = "absorbing"
[[habitat]]
name = "open"
[[habitat]]
name = "treated"
stress = 1.5
[[inoculum]]
where = "rect:0,0,1,2"
trait = [0.0, 0.0]
exponent = 1.0
[run]
until = 1.0
time_unit = "plain"
sync = 0.05
)";
    for (const char* method : {"exact", "leap", "auto", "exact-spatial"}) {
        INFO(method);
        const Scenario s = parse_scenario(text, "books.toml", {std::string("run.method=") + method});
        Engine engine(s, 1);
        NoOutput none;
        CHECK_NOTHROW(engine.run(none));
        CHECK(engine.step_number() >= 20);
        CHECK(engine.totals().events() > 0);
    }
}
