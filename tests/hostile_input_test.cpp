// Hostile input (docs/reliability.md): numbers that would overflow a count, a patch's scale
// or the machine's memory are refused with the limit named, never wrapped; and the inputs
// the fuzzers found are regression cases here.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "io/scenario_loader.hpp"

using namespace tessera;

namespace {

// Every message of the error `text` raises; fails the test if it loads.
std::string errors_of(const std::string& text, const std::vector<std::string>& sets = {}) {
    try {
        parse_scenario(text, "hostile.toml", sets);
    } catch (const ScenarioError& e) {
        return e.what();
    }
    FAIL("the scenario loaded, but errors were expected:\n" << text);
    return {};
}

}  // namespace

TEST_CASE("counts beyond 2^62 are refused, never wrapped") {
    // One count past the limit, past 2^63 and past 2^64.
    CHECK_THAT(errors_of("[[inoculum]]\nactive = 4611686018427387904\n"), Catch::Contains("below 2^62"));
    CHECK_THAT(errors_of("[[inoculum]]\nactive = 9.3e18\n"), Catch::Contains("below 2^62"));
    CHECK_THAT(errors_of("[[inoculum]]\nactive = 1\ndormant = 2e19\n"), Catch::Contains("below 2^62"));
    // An integer beyond int64 is not valid TOML; it is reported, not wrapped.
    CHECK_THAT(errors_of("[[inoculum]]\nactive = 99999999999999999999\n"), Catch::Contains("hostile.toml:2"));
    // Inocula that overlap add up: each below the limit, together above it.
    const std::string two = "[[inoculum]]\nactive = 3e18\n[[inoculum]]\nactive = 3e18\n";
    CHECK_THAT(errors_of(two), Catch::Contains("fewer than 2^62 (4.6e18) cells per patch in total"));
    CHECK_THAT(errors_of("[[inoculum]]\nactive = 3e18\ndormant = 3e18\n"), Catch::Contains("cells per patch in total"));
    // Just below stays accepted.
    CHECK_NOTHROW(parse_scenario("[[inoculum]]\nactive = 4e18\n", "ok.toml"));
}

TEST_CASE("whole-number keys beyond their range are refused with the range") {
    CHECK_THAT(errors_of("[run]\nseed = 1e19\n"), Catch::Contains("must be a whole number"));
    CHECK_THAT(errors_of("[run]\nseed = -1\n"), Catch::Contains("a whole number >= 0"));
    CHECK_THAT(errors_of("[run]\nthreads = 1e300\n"), Catch::Contains("must be a whole number"));
    CHECK_THAT(errors_of("[traits]\ndormancy = { max = 1.0, levels = 4294967297 }\n"),
               Catch::Contains("an integer from 1 to 1000"));
    CHECK_THAT(errors_of("[lattice]\nwidth = 4294967297\n"), Catch::Contains("from 1 to 100000"));
    CHECK_THAT(errors_of("[[inoculum]]\nwhere = \"patch:4294967296,0\"\nactive = 1\n"),
               Catch::Contains("cannot read \"patch:4294967296,0\" as a patch"));
}

TEST_CASE("K beyond 1e18, and K * capacity beyond 1e18, are refused") {
    CHECK_THAT(errors_of("[scale]\nK = 1.0000001e18\n"), Catch::Contains("a number from 1 to 1e18"));
    CHECK_THAT(errors_of("[scale]\nK = 1e300\n"), Catch::Contains("a number from 1 to 1e18"));
    const std::string big = errors_of("[scale]\nK = 1e17\n[[habitat]]\ncapacity = 100\n");
    CHECK_THAT(big, Catch::Contains("habitat[1].capacity"));
    CHECK_THAT(big, Catch::Contains("K * capacity <= 1e18 (capacity <= 10 with this K)"));
    // capacity = 1e300 would make K_p infinite.
    CHECK_THAT(errors_of("[[habitat]]\ncapacity = 1e300\n"), Catch::Contains("K * capacity <= 1e18"));
    CHECK_THAT(errors_of("[scale]\nK = 1e18\n[[habitat]]\nname = \"a\"\n[[schedule]]\nhabitat = \"a\"\nend = 1\n"
                         "capacity = 2\n"),
               Catch::Contains("schedule[1].capacity"));
    CHECK_NOTHROW(parse_scenario("[scale]\nK = 1e18\n", "ok.toml"));
}

TEST_CASE("lattices beyond memory are refused with the limit named") {
    CHECK_THAT(errors_of("[lattice]\nwidth = 100000\nheight = 100000\n"), Catch::Contains("at most 1e8 patches"));
    // 1e8 patches are allowed, but not with 1e6 traits each.
    const std::string wide = errors_of(
        "[traits]\ndormancy = { max = 1.0, levels = 1000 }\ntransfer = { max = 1.0, levels = 1000 }\n"
        "[rates]\nbirth_max = 5\n[lattice]\nwidth = 10000\nheight = 10000\n");
    CHECK_THAT(wide, Catch::Contains("1e+08 patches x 1e+06 traits"));
    CHECK_THAT(wide, Catch::Contains("accepted: patches x traits <= 1e9 (16 GB)"));
    // The same through --set.
    CHECK_THAT(errors_of("", {"lattice.width=10000", "lattice.height=10000", "traits.dormancy.levels=10"}),
               Catch::Contains("patches x traits <= 1e9"));
    // At the limit exactly: 1e6 patches x 1000 traits.
    CHECK_NOTHROW(parse_scenario("[traits]\ndormancy = { max = 1.0, levels = 1000 }\ntransfer = { max = 1.0, levels = 1 }\n"
                                 "[lattice]\nwidth = 1000\nheight = 1000\n",
                                 "ok.toml"));
}
