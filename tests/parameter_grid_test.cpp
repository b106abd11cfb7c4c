// --vary specifications and the grid they make (src/study/parameter_grid.*); the command's
// own refusals (unknown keys, values out of range) are in sweep_cli_test.cpp.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "study/parameter_grid.hpp"

using namespace tessera;
using Catch::Matchers::Contains;
using strings = std::vector<std::string>;

TEST_CASE("linear ranges include both ends and are written in 12 significant digits", "[grid]") {
    const GridAxis a = parse_vary("rates.dormancy_probability=0:0.25:6");
    CHECK(a.key == "rates.dormancy_probability");
    CHECK(a.values == strings{"0", "0.05", "0.1", "0.15", "0.2", "0.25"});
    CHECK(parse_vary("rates.transfer = 0.1:0.3:3").values == strings{"0.1", "0.2", "0.3"});
    CHECK(parse_vary("scale.K=5:5:1").values == strings{"5"});
    CHECK(parse_vary("rates.death=2:1:3").values == strings{"2", "1.5", "1"});  // decreasing is allowed
}

TEST_CASE("log ranges are evenly spaced in log", "[grid]") {
    CHECK(parse_vary("scale.K=log:1e3:1e6:4").values == strings{"1000", "10000", "100000", "1000000"});
    CHECK(parse_vary("rates.transfer=log:0.01:1:3").values == strings{"0.01", "0.1", "1"});
}

TEST_CASE("lists keep their values as written, and commas inside brackets and quotes do not split", "[grid]") {
    CHECK(parse_vary("rates.transfer_form=frequency,density").values == strings{"frequency", "density"});
    CHECK(parse_vary("inoculum[1].trait=[0.0, 0.0],[2.0, 0.0]").values == strings{"[0.0, 0.0]", "[2.0, 0.0]"});
    CHECK(parse_vary("inoculum[1].where=\"patch:0,0\",\"patch:1,1\"").values ==
          strings{"\"patch:0,0\"", "\"patch:1,1\""});
    CHECK(parse_vary("run.method=exact").values == strings{"exact"});
}

TEST_CASE("bad specifications name the key and say what is wrong", "[grid]") {
    auto refused = [](const std::string& spec, const std::string& key, const std::string& what) {
        try {
            parse_vary(spec);
            FAIL("accepted: " << spec);
        } catch (const VaryError& e) {
            CHECK(e.key() == key);
            CHECK_THAT(e.what(), Contains(what));
        }
    };
    refused("rates.transfer", "", "expected KEY=FROM:TO:N");
    refused("=1:2:3", "", "key before '=' is empty");
    refused("rates.transfer=", "rates.transfer", "no values");
    refused("rates.transfer=1:1:4", "rates.transfer", "empty range");
    refused("rates.transfer=0:1:0", "rates.transfer", "N '0'");
    refused("rates.transfer=0:1:2.5", "rates.transfer", "whole number");
    refused("rates.transfer=0:1:1", "rates.transfer", "N = 1");
    refused("rates.transfer=a:1:3", "rates.transfer", "FROM 'a' is not a number");
    refused("rates.transfer=0:b:3", "rates.transfer", "TO 'b' is not a number");
    refused("scale.K=log:0:1e6:3", "scale.K", "FROM and TO > 0");
    refused("rates.transfer=1:2", "rates.transfer", "is not a range");
    refused("rates.transfer=1,,2", "rates.transfer", "empty value");
}

TEST_CASE("the grid is the product of the axes, the last axis fastest", "[grid]") {
    const ParameterGrid g({parse_vary("a.x=1,2"), parse_vary("b.y=10,20,30")});
    REQUIRE(g.size() == 6);
    CHECK(g.values(0) == strings{"1", "10"});
    CHECK(g.values(1) == strings{"1", "20"});
    CHECK(g.values(3) == strings{"2", "10"});
    CHECK(g.values(5) == strings{"2", "30"});
    CHECK(g.overrides(4) == strings{"a.x=2", "b.y=20"});
    CHECK_THROWS_AS(ParameterGrid({parse_vary("a.x=1,2"), parse_vary("a.x=3,4")}), VaryError);
}
