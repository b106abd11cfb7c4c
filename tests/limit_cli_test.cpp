// tessera predict --model limit and the limit beside a one-patch run, through the built
// program: refusals (exit 2, naming the file and the key), the two files and their headers,
// the summary, and a run's own scenario.resolved.toml kept.
#include <catch2/catch.hpp>

#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using Catch::Matchers::Contains;

using namespace tessera;

namespace {

const std::string tool = TESSERA_BINARY;
using clitest::slurp;

fs::path scratch() {
    static const clitest::ScratchDir s("tessera-limit-cli-test");
    return s.path();
}

int program(const std::string& args, std::string* out = nullptr, std::string* err = nullptr) {
    return clitest::run_program(tool, args, scratch(), out, err);
}

std::string first_line(const fs::path& p) {
    std::ifstream in(p);
    std::string line;
    std::getline(in, line);
    return line;
}

fs::path write(const std::string& name, const std::string& text) {
    const fs::path file = scratch() / name;
    std::ofstream(file, std::ios::binary) << text;
    return file;
}

// Runs the program; stdout and stderr come back through `out` and `err`.

// model.md section 7's checked example.
const std::string cycling = "title = \"transfer cycle\"\n"
                            "[rates]\ntransfer = 1.5\ndormancy_probability = 0.0\nmutation_exponent = 0.5\n"
                            "[scale]\nK = 1e8\n"
                            "[[inoculum]]\ntrait = [0.0, 0.0]\nexponent = 1.0\n"
                            "[run]\nuntil = 10.0\n[output]\nevery = 0.5\n";

}  // namespace

TEST_CASE("predict --model limit refuses a lattice, naming the file and the key", "[limit][cli]") {
    const fs::path f = write("lattice.toml", "[lattice]\nwidth = 3\nheight = 2\n");
    std::string err;
    CHECK(program("predict '" + f.string() + "' --model limit --out '" + (scratch() / "lat").string() + "'", nullptr,
                  &err) == 2);
    CHECK_THAT(err, Contains(f.string()) && Contains("lattice.width") && Contains("--model ode"));
    CHECK(!fs::exists(scratch() / "lat" / "limit_series.csv"));
}

TEST_CASE("predict refuses an unknown --model", "[limit][cli]") {
    const fs::path f = write("one.toml", cycling);
    std::string err;
    CHECK(program("predict '" + f.string() + "' --model guess", nullptr, &err) == 2);
    CHECK_THAT(err, Contains("--model") && Contains("guess"));
}

TEST_CASE("predict --model limit refuses a schedule in plain time, naming it and run.time_unit", "[limit][cli]") {
    const fs::path f = write("plain.toml", "[[habitat]]\nname = \"open\"\n"
                                           "[[schedule]]\nhabitat = \"open\"\nstart = 1.0\nend = 2.0\nstress = 1.0\n"
                                           "[run]\ntime_unit = \"plain\"\nuntil = 5.0\n");
    std::string err;
    CHECK(program("predict '" + f.string() + "' --out '" + (scratch() / "plain").string() + "'", nullptr, &err) == 2);
    CHECK_THAT(err, Contains(f.string()) && Contains("schedule[1]") && Contains("run.time_unit = \"logK\""));
}

TEST_CASE("predict writes limit_series.csv and limit_phases.csv and names the cycle", "[limit][cli]") {
    const fs::path f = write("cycle.toml", cycling);
    const fs::path dir = scratch() / "cycle";
    std::string out, err;
    REQUIRE(program("predict '" + f.string() + "' --out '" + dir.string() + "'", &out, &err) == 0);
    CHECK(err.empty());
    CHECK(first_line(dir / "limit_series.csv") == "t_logK,dormancy,transfer,exponent");
    CHECK(first_line(dir / "limit_phases.csv") ==
          "phase,start_t_logK,end_t_logK,end,dormancy,transfer,active_density,dormant_density");
    CHECK(fs::exists(dir / "scenario.resolved.toml"));
    CHECK_THAT(out, Contains("cycles with period 3"));
    // 21 output times (0, 0.5, ..., 10) of 9 traits, and the header.
    const std::string series = slurp(dir / "limit_series.csv");
    CHECK(std::count(series.begin(), series.end(), '\n') == 1 + 21 * 9);
    CHECK_THAT(series, Contains("\n1,0,2,1\n"));   // (0, 2) reaches 1 at t/lnK = 1
    CHECK_THAT(series, Contains("\n0.5,0,2,0.75\n"));
    const std::string phases = slurp(dir / "limit_phases.csv");
    CHECK_THAT(phases, Contains("\n0,0,1,invasion,0,0,3,0\n"));
    // A second prediction of the same model needs --overwrite.
    CHECK(program("predict '" + f.string() + "' --out '" + dir.string() + "'", nullptr, &err) == 2);
    CHECK(program("predict '" + f.string() + "' --out '" + dir.string() + "' --overwrite --quiet", &out) == 0);
    CHECK(out.empty());
}

TEST_CASE("run on one patch writes limit_series.csv and predict beside it keeps the run settings", "[limit][cli]") {
    const fs::path f = write("small.toml", "[rates]\ntransfer = 1.5\nmutation_exponent = 0.5\n[scale]\nK = 1000\n"
                                           "[[inoculum]]\ntrait = [0.0, 0.0]\nexponent = 1.0\n"
                                           "[run]\nuntil = 0.2\nseed = 3\n[output]\nevery = 0.1\nfields_every = 0\n");
    const fs::path dir = scratch() / "run";
    REQUIRE(program("run '" + f.string() + "' --out '" + dir.string() + "' --quiet") == 0);
    CHECK(fs::exists(dir / "series.csv"));
    CHECK(first_line(dir / "limit_series.csv") == "t_logK,dormancy,transfer,exponent");
    const std::string resolved = slurp(dir / "scenario.resolved.toml");
    std::string out;
    REQUIRE(program("predict '" + f.string() + "' --set rates.transfer=2 --out '" + dir.string() + "'", &out) == 0);
    CHECK(slurp(dir / "scenario.resolved.toml") == resolved);
    CHECK(fs::exists(dir / "predict.resolved.toml"));
    CHECK_THAT(out, Contains("predict.resolved.toml"));
    // A lattice run writes no limit_series.csv.
    const fs::path g = write("grid.toml", "[lattice]\nwidth = 2\nheight = 1\n[scale]\nK = 100\n"
                                          "[run]\nuntil = 0.05\n[output]\nevery = 0.05\nfields_every = 0\n");
    const fs::path lattice = scratch() / "lattice-run";
    std::string err;
    REQUIRE(program("run '" + g.string() + "' --out '" + lattice.string() + "' --quiet", nullptr, &err) == 0);
    CHECK(err.empty());
    CHECK(!fs::exists(lattice / "limit_series.csv"));
}
