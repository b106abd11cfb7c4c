// Determinism (validation.md V13): counter-based streams keyed by (seed, replicate, patch)
// and countered by (step, phase) make a run's bits independent of the number of threads
// and of scheduling (Salmon et al. 2011, "Parallel random numbers: as easy as 1, 2, 3", SC11).
// Byte comparison of the series text, so any difference fails.
#include <catch2/catch.hpp>
#include <tbb/global_control.h>

#include <string>
#include <vector>

#include "core/parallel.hpp"
#include "run_support.hpp"

using namespace tessera;
using runtest::run_text;

namespace {

// A small scenario that uses every local event and, on a lattice, migration.
Scenario busy_scenario(int width, int height) {
    Scenario s;
    s.K = 300;
    s.width = width;
    s.height = height;
    s.habitats = {Habitat{}};
    Habitat stressed;
    stressed.name = "stressed";
    stressed.symbol = "s";
    stressed.stress = 1.5;
    stressed.resuscitation = 0.5;
    s.habitats.push_back(stressed);
    s.habitat_of_patch.assign(static_cast<std::size_t>(width) * height, 0);
    s.habitat_of_patch.back() = 1;
    s.rates.dormancy_probability = 0.2;
    s.rates.dormant_death = 0.1;
    s.rates.mutation_backward = 0.2;
    s.rates.transfer = 3.0;
    s.rates.migration = 0.3;
    s.rates.migration_dormant = 0.05;
    Inoculum in;
    in.active = 200;
    in.dormant = 10;
    s.inocula = {in};
    s.time_unit = TimeUnit::plain;
    s.until = 3.0;
    s.output_every = 0.5;
    s.sync = 0.05;
    s.seed = 42;
    return s;
}

}  // namespace

TEST_CASE("same seed gives the same bytes; another seed does not") {
    const Scenario s = busy_scenario(1, 1);
    const std::string a = run_text(s, 1);
    CHECK(a == run_text(s, 1));
    Scenario other = s;
    other.seed = 43;
    CHECK(a != run_text(other, 1));
    CHECK(a != run_text(s, 1, /*replicate=*/1));  // replicates are independent streams
}

TEST_CASE("a lattice run gives the same bytes on 1 and 2 threads") {
    const Scenario s = busy_scenario(4, 3);
    const std::string one = run_text(s, 1);
    const std::string two = run_text(s, 2);
    REQUIRE(one.size() > 1000);
    CHECK(one == two);
}

TEST_CASE("replicates run in parallel equal replicates run one by one") {
    const Scenario s = busy_scenario(2, 2);
    std::vector<std::string> serial, parallel(4);
    for (std::uint32_t r = 0; r < 4; ++r) serial.push_back(run_text(s, 1, r));
    {
        tbb::global_control limit(tbb::global_control::max_allowed_parallelism, 2);
        tessera::parallel_for(0, 4, [&](int r) {  // tells TSan of the fork and join
            parallel[static_cast<std::size_t>(r)] = runtest::series_of(s, static_cast<std::uint32_t>(r));
        });
    }
    CHECK(serial == parallel);
}
