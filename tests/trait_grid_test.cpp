// The trait grid and the per-trait rate table: known answers from model.md sections 1-2.
#include <catch2/catch.hpp>

#include "core/rate_table.hpp"
#include "core/trait_grid.hpp"

using namespace tessera;

TEST_CASE("default grid is 3 x 3 with step 2, dormancy major") {
    TraitGrid g({4.0, 3}, {4.0, 3});
    REQUIRE(g.size() == 9);
    CHECK(g.dormancy(5) == 2.0);
    CHECK(g.transfer(5) == 4.0);
    CHECK(g.find(2.0, 4.0) == 5);
    CHECK_FALSE(g.find(1.0, 0.0).has_value());
    CHECK_FALSE(g.find(6.0, 0.0).has_value());
}

TEST_CASE("birth rates, dormancy probabilities and overrides") {
    TraitGrid g({4.0, 3}, {4.0, 3});
    Rates r;
    r.overrides.push_back({4.0, 0.0, 2.5, std::nullopt, 3.0, 0.9});
    RateTable t(g, r, 1e4);
    CHECK(t.birth[0] == 4.0);
    CHECK(t.birth[*g.find(2.0, 2.0)] == 2.0);  // 4 - 0.5*2 - 0.5*2
    CHECK(t.birth[*g.find(4.0, 0.0)] == 2.5);  // overridden
    CHECK(t.competition[*g.find(4.0, 0.0)] == 3.0);
    CHECK(t.dormancy_probability[*g.find(2.0, 0.0)] == Approx(0.2));
    CHECK(t.dormancy_probability[*g.find(4.0, 0.0)] == 0.9);
    CHECK(t.mutation_probability == Approx(0.01));  // 1e4^-0.5
}

TEST_CASE("mutation targets follow the edge rules") {
    TraitGrid g({4.0, 3}, {4.0, 3});
    RateTable t(g, Rates{}, 1e4);
    CHECK(t.forward[0].count == 2);
    CHECK(t.forward[*g.find(4.0, 0.0)].count == 1);
    CHECK(t.forward[*g.find(4.0, 0.0)].trait[0] == *g.find(4.0, 2.0));
    CHECK(t.forward[8].count == 0);  // far corner: no mutation
    CHECK(t.backward[0].count == 0);
    CHECK(t.backward[8].count == 2);
}
