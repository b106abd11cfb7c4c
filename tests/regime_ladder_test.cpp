// The bundled regime ladder (maps/dormancy-ladder) keeps its promise: as the dormancy
// probability p rises, the K -> infinity limit and stochastic runs at the scenario's K = 1e8
// both go cycling -> coexistence -> resident, with the residents the scenario's comment
// names. The guide (section 7, "A regime ladder") and the README show this sweep.
//
// Where the boundaries must lie comes from invasion analysis (docs/model.md section 4) done
// by hand for this scenario: our own numbers, not a published value. d = 1, C = 1, kappa = 0
// (so q' = q = 4p for the dormant-capable traits), tau = 1.7, b(0,0) = 4, b(4,4) = 1.2.
//  - cycling on the transfer axis needs 1 < tau < 2 (each transfer step costs 1 of
//    division; (0,0) beats (0,4) back while tau < 2), independent of p;
//  - 0:0 invades a 4:4 resident, of active density n = (1.2 - 1) / (1 - 4p), iff
//    4 - 1 - n - tau > 0, i.e. p < (1 - 0.2 / 1.3) / 4 = 0.2115;
//  - 4:4 invades a 0:0 resident (n = 3) iff the determinant of
//    [[1.2 - 1 - 3 + tau, 1], [4p * 3, -1]] is negative: 1.1 - 12p < 0, p > 0.0917.
// So the pair 0:0 + 4:4 can coexist only for 0.0917 < p < 0.2115, and above 0.2115 4:4 is
// resident alone. The limit sweep must put the coexistence/resident boundary between the
// grid points 0.20 and 0.22, and keep p <= 0.08 cycling (the cycle's other phases push the
// start of coexistence above 0.0917; where exactly is the limit's own answer, 0.14 on this
// grid). Stochastic runs at K = 1e8 sit up to two grid steps lower (docs/guide.md section 7).
#include <catch2/catch.hpp>

#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "cli_support.hpp"

namespace {

using namespace tessera::clitest;

const std::string ladder = std::string(TESSERA_SOURCE_DIR) + "/maps/dormancy-ladder/scenario.toml";

struct Outcome {
    std::string regime;
    std::string residents;
};

// outcomes.csv's rows of one source, keyed by point; with replicates, the regime of the
// majority (ties impossible with an odd number of replicates).
std::map<int, Outcome> majority(const fs::path& dir, const std::string& source) {
    std::istringstream in(slurp(dir / "outcomes.csv"));
    std::string line;
    std::getline(in, line);  // header: point,source,replicate,regime,residents,period,final_t_logK
    std::map<int, std::map<std::string, int>> votes;
    std::map<int, std::map<std::string, std::string>> residents;
    while (std::getline(in, line)) {
        std::vector<std::string> f;
        std::stringstream cells(line);
        for (std::string c; std::getline(cells, c, ',');) f.push_back(c);
        REQUIRE(f.size() >= 5);
        if (f[1] != source) continue;
        const int point = std::stoi(f[0]);
        ++votes[point][f[3]];
        residents[point][f[3]] = f[4];
    }
    std::map<int, Outcome> out;
    for (const auto& [point, v] : votes) {
        std::string best;
        int most = -1;
        for (const auto& [regime, n] : v)
            if (n > most) best = regime, most = n;
        out[point] = {best, residents[point][best]};
    }
    return out;
}

}  // namespace

TEST_CASE("the regime ladder's limit goes cycling, coexistence, resident at the hand-derived p", "[ladder]") {
    ScratchDir scratch("tessera-ladder-limit");
    const fs::path dir = scratch.path() / "sweep";
    std::string err;
    // p = 0, 0.02, ..., 0.24 as in the guide.
    REQUIRE(run_program(TESSERA_BINARY,
                        "sweep '" + ladder + "' --vary rates.dormancy_probability=0:0.24:13 --with limit --quiet --out '" +
                            dir.string() + "'",
                        scratch.path(), nullptr, &err) == 0);
    const auto limit = majority(dir, "limit");
    REQUIRE(limit.size() == 13);
    // p <= 0.08: below the pair's lower bound 0.0917, so nothing but the cycle is possible.
    for (int i = 0; i <= 4; ++i) {
        CHECK(limit.at(i).regime == "cycling");
        CHECK(limit.at(i).residents == "0:0;0:2;0:4");
    }
    // p = 0.16 to 0.20: inside (0.0917, 0.2115), and 0.20 just below the upper bound.
    for (int i = 8; i <= 10; ++i) {
        CHECK(limit.at(i).regime == "coexistence");
        CHECK(limit.at(i).residents == "0:0;4:4");
    }
    // p = 0.22 and 0.24: above 0.2115.
    for (int i = 11; i <= 12; ++i) {
        CHECK(limit.at(i).regime == "resident");
        CHECK(limit.at(i).residents == "4:4");
    }
}

TEST_CASE("stochastic runs of the regime ladder at K = 1e8 show the same three regimes", "[ladder]") {
    // One p deep inside each regime, 3 replicates each (a majority of 3; about 3 s in all).
    // A run in the wrong regime at one of these p would mean the engine and the limit
    // disagree well beyond the boundary shift seen in the guide's 8-replicate sweep.
    ScratchDir scratch("tessera-ladder-runs");
    const fs::path dir = scratch.path() / "sweep";
    std::string err;
    REQUIRE(run_program(TESSERA_BINARY,
                        "sweep '" + ladder + "' --vary rates.dormancy_probability=0.04,0.16,0.24 --with run " +
                            "--replicates 3 --quiet --out '" + dir.string() + "'",
                        scratch.path(), nullptr, &err) == 0);
    const auto runs = majority(dir, "run");
    REQUIRE(runs.size() == 3);
    CHECK(runs.at(0).regime == "cycling");
    CHECK(runs.at(0).residents == "0:0;0:2;0:4");
    CHECK(runs.at(1).regime == "coexistence");
    CHECK(runs.at(1).residents == "0:0;4:4");
    CHECK(runs.at(2).regime == "resident");
    CHECK(runs.at(2).residents == "4:4");
}
