// Determinism of the leap engine on a lattice (validation.md V13): a run with method "leap"
// or "auto" gives the same bytes on 1 and 2 threads. The leap engine draws a varying number
// of variates per step (Poisson draws, PTRS rejections, critical firings, exact stretches),
// all from the patch's own stream (seed, replicate, patch; step, phase), so the thread that
// runs a patch cannot change them (Salmon et al. 2011, "Parallel random numbers: as easy as
// 1, 2, 3", SC11). determinism_test.cpp covers the exact engine at K = 300; this covers K
// where "auto" leaps in crowded patches and simulates exactly in the sparse ones.
#include <catch2/catch.hpp>

#include <string>

#include "run_support.hpp"

using namespace tessera;
using runtest::run_text;

namespace {

// 4 x 3 patches at K = 1e5: a full column of the resident, a few cells of two other traits
// in one corner, the rest empty and filled by migration, so that crowded patches leap and
// the front (few hundred cells) runs exactly under "auto". Mutation, conjugation, dormancy
// and resuscitation are all on (the defaults).
Scenario crowded(Method method) {
    Scenario s;
    s.K = 1e5;
    s.width = 4;
    s.height = 3;
    s.habitats = {Habitat{}};
    s.habitat_of_patch.assign(12, 0);
    s.method = method;
    s.rates.migration = 0.5;
    s.rates.migration_dormant = 0.1;
    Inoculum resident;
    resident.where = Inoculum::Where::rect;
    resident.x0 = 0;
    resident.y0 = 0;
    resident.x1 = 0;
    resident.y1 = 2;
    resident.active = 1e5;
    Inoculum donors;
    donors.where = Inoculum::Where::patch;
    donors.x0 = 0;
    donors.y0 = 0;
    donors.transfer = 4.0;
    donors.active = 30;
    Inoculum sleepers;
    sleepers.where = Inoculum::Where::patch;
    sleepers.x0 = 0;
    sleepers.y0 = 2;
    sleepers.dormancy = 4.0;
    sleepers.dormant = 200;
    s.inocula = {resident, donors, sleepers};
    s.time_unit = TimeUnit::plain;
    s.until = 1.0;
    s.output_every = 0.25;
    s.seed = 7;
    return s;
}

}  // namespace

TEST_CASE("a leap lattice run gives the same bytes on 1 and 2 threads") {
    const Scenario s = crowded(Method::leap);
    const std::string one = run_text(s, 1);
    REQUIRE(one.size() > 1000);
    CHECK(one == run_text(s, 2));
    CHECK(one == run_text(s, 1));
}

TEST_CASE("an auto lattice run gives the same bytes on 1 and 2 threads") {
    const Scenario s = crowded(Method::auto_select);
    const std::string one = run_text(s, 1);
    REQUIRE(one.size() > 1000);
    CHECK(one == run_text(s, 2));
    Scenario other = s;
    other.seed = 8;
    CHECK(one != run_text(other, 1));
}
