// The scenario loader and the resolved-scenario writer (src/io): defaults, every key, every
// kind of validation error with its line and key, "did you mean", --set overrides, text and
// PNG maps, and the resolved file reading back to an equal Scenario.
#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <sstream>
#include <unistd.h>

#include "io/scenario_loader.hpp"
#include "io/scenario_writer.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

// A fresh folder per test case, so files of one case never meet another's.
fs::path temp_dir(const std::string& name) {
    fs::path d = fs::temp_directory_path() / ("tessera_loader_test_" + std::to_string(::getpid())) / name;
    fs::remove_all(d);
    fs::create_directories(d);
    return d;
}

void write_file(const fs::path& p, const std::string& text) {
    std::ofstream out(p, std::ios::binary);
    out << text;
}

// The diagnostics `text` produces; fails the test if it loads.
std::vector<Diagnostic> errors_of(const std::string& text, const std::vector<std::string>& sets = {}) {
    try {
        parse_scenario(text, "bad.toml", sets);
    } catch (const ScenarioError& e) {
        return e.diagnostics();
    }
    FAIL("the scenario loaded, but errors were expected:\n" << text);
    return {};
}

std::string all_text(const std::vector<Diagnostic>& ds) {
    std::string out;
    for (const Diagnostic& d : ds) {
        out += d.to_string();
        out += '\n';
    }
    return out;
}

// The one diagnostic about `key`; fails unless there is exactly one.
Diagnostic only_about(const std::vector<Diagnostic>& ds, const std::string& key) {
    std::vector<Diagnostic> found;
    for (const Diagnostic& d : ds)
        if (d.key == key) found.push_back(d);
    INFO(all_text(ds));
    REQUIRE(found.size() == 1);
    return found[0];
}

// Checks that `text` fails with a diagnostic on `line` about `key` whose message contains
// every one of `parts`.
void expect_error(const std::string& text, int line, const std::string& key, std::vector<std::string> parts) {
    const auto ds = errors_of(text);
    const Diagnostic d = only_about(ds, key);
    INFO(d.to_string());
    CHECK(d.file == "bad.toml");
    CHECK(d.line == line);
    for (const std::string& p : parts) CHECK(d.message.find(p) != std::string::npos);
}

const std::string full_example = R"(title = "every key"

[traits]
dormancy = { max = 2.0, levels = 2 }
transfer = { max = 6.0, levels = 4 }

[rates]
birth_max = 5.0
birth_cost_dormancy = 0.25
birth_cost_transfer = 0.125
death = 0.75
competition = 1.5
dormancy_probability = 0.2
transfer = 12.5
transfer_form = "density"
transfer_copies = "transfer_only"
dormant_death = 0.01
resuscitation = 0.5
mutation_exponent = 0.625
mutation_backward = 0.3
competition_counts_dormant = true
migration = 0.07
migration_dormant = 0.002

[[rates.override]]
trait = [2.0, 0.0]
birth = 2.5
death = 1.25
competition = 3.0
dormancy_probability = 0.9

[scale]
K = 1e6

[lattice]
width = 5
height = 4
neighbourhood = 8
boundary = "periodic"

[[habitat]]
name = "open"
symbol = "."
colour = "#d8d8d8"

[[habitat]]
name = "treated"
symbol = "T"
colour = "#aa2020"
capacity = 0.5
stress = 0.25
resuscitation = 2.0
permeability = 0.1

[[inoculum]]
where = "all"
trait = [0.0, 0.0]
exponent = 0.5

[[inoculum]]
where = "habitat:treated"
trait = [2.0, 6.0]
active = 1000
dormant = 20

[[inoculum]]
where = "patch:4,3"
trait = [0.0, 2.0]
active = 7

[[inoculum]]
where = "rect:3,2,1,0"
trait = [2.0, 4.0]
dormant = 5

[[schedule]]
habitat = "treated"
start = 10.0
end = 12.0
every = 24.0
stress = 3.0
capacity = 0.25

[run]
until = 30.0
time_unit = "plain"
method = "exact-spatial"
sync = 0.02
seed = 42
threads = 3

[output]
every = 0.5
fields_every = 2.0
frames_every = 0.25
frame_scale = 6
)";

}  // namespace

TEST_CASE("a minimal scenario takes every documented default") {
    const Scenario s = parse_scenario("title = \"minimal\"\n", "min.toml");
    const Scenario d;
    CHECK(s.title == "minimal");
    CHECK(s.dormancy_axis == d.dormancy_axis);
    CHECK(s.transfer_axis == d.transfer_axis);
    CHECK(s.rates == d.rates);
    CHECK(s.K == d.K);
    CHECK(s.width == 1);
    CHECK(s.height == 1);
    CHECK(s.neighbourhood == 4);
    CHECK(s.boundary == Boundary::reflecting);
    CHECK(s.map.empty());
    REQUIRE(s.habitats.size() == 1);
    CHECK(s.habitats[0] == Habitat{});
    CHECK(s.habitat_of_patch == std::vector<std::uint16_t>{0});
    REQUIRE(s.inocula.size() == 1);  // the default inoculum: K_p cells of trait (0, 0) everywhere
    CHECK(s.inocula[0].where == Inoculum::Where::all);
    CHECK(s.inocula[0].dormancy == 0.0);
    CHECK(s.inocula[0].transfer == 0.0);
    CHECK(s.inocula[0].exponent == 1.0);
    CHECK_FALSE(s.inocula[0].active.has_value());
    CHECK(s.inocula[0].dormant == 0.0);
    CHECK(s.schedules.empty());
    CHECK(s.until == d.until);
    CHECK(s.time_unit == TimeUnit::logK);
    CHECK(s.method == Method::auto_select);
    CHECK(s.sync == d.sync);
    CHECK(s.seed == 1);
    CHECK(s.threads == 0);
    CHECK(s.output_every == d.output_every);
    CHECK(s.fields_every == d.fields_every);
    CHECK(s.frames_every == d.frames_every);
    CHECK(s.frame_scale == 4);
    CHECK(s.source_path == "min.toml");
    // An empty file is a scenario too.
    CHECK_NOTHROW(parse_scenario("", "empty.toml"));
}

TEST_CASE("every key of the scenario file is read") {
    const Scenario s = parse_scenario(full_example, "full.toml");
    CHECK(s.title == "every key");
    CHECK(s.dormancy_axis == TraitAxis{2.0, 2});
    CHECK(s.transfer_axis == TraitAxis{6.0, 4});
    const Rates& r = s.rates;
    CHECK(r.birth_max == 5.0);
    CHECK(r.birth_cost_dormancy == 0.25);
    CHECK(r.birth_cost_transfer == 0.125);
    CHECK(r.death == 0.75);
    CHECK(r.competition == 1.5);
    CHECK(r.dormancy_probability == 0.2);
    CHECK(r.transfer == 12.5);
    CHECK(r.transfer_form == TransferForm::density);
    CHECK(r.transfer_copies == TransferCopies::transfer_only);
    CHECK(r.dormant_death == 0.01);
    CHECK(r.resuscitation == 0.5);
    CHECK(r.mutation_exponent == 0.625);
    CHECK(r.mutation_backward == 0.3);
    CHECK(r.competition_counts_dormant);
    CHECK(r.migration == 0.07);
    CHECK(r.migration_dormant == 0.002);
    REQUIRE(r.overrides.size() == 1);
    CHECK(r.overrides[0] == RateOverride{2.0, 0.0, 2.5, 1.25, 3.0, 0.9});
    CHECK(s.K == 1e6);
    CHECK(s.width == 5);
    CHECK(s.height == 4);
    CHECK(s.neighbourhood == 8);
    CHECK(s.boundary == Boundary::periodic);
    REQUIRE(s.habitats.size() == 2);
    CHECK(s.habitats[1] == Habitat{"treated", "T", "#aa2020", 0.5, 0.25, 2.0, 0.1});
    CHECK(s.habitat_of_patch == std::vector<std::uint16_t>(20, 0));
    REQUIRE(s.inocula.size() == 4);
    CHECK(s.inocula[0].exponent == 0.5);
    CHECK(s.inocula[1].where == Inoculum::Where::habitat);
    CHECK(s.inocula[1].habitat == "treated");
    CHECK(s.inocula[1].dormancy == 2.0);
    CHECK(s.inocula[1].transfer == 6.0);
    CHECK(s.inocula[1].active == 1000.0);
    CHECK(s.inocula[1].dormant == 20.0);
    CHECK(s.inocula[2].where == Inoculum::Where::patch);
    CHECK((s.inocula[2].x0 == 4 && s.inocula[2].y0 == 3));
    CHECK(s.inocula[2].active == 7.0);
    CHECK(s.inocula[3].where == Inoculum::Where::rect);  // corners given in any order
    CHECK((s.inocula[3].x0 == 1 && s.inocula[3].y0 == 0 && s.inocula[3].x1 == 3 && s.inocula[3].y1 == 2));
    CHECK(s.inocula[3].active == 0.0);  // only dormant cells
    CHECK(s.inocula[3].dormant == 5.0);
    REQUIRE(s.schedules.size() == 1);
    const Schedule& sc = s.schedules[0];
    CHECK(sc.habitat == "treated");
    CHECK(sc.start == 10.0);
    CHECK(sc.end == 12.0);
    CHECK(sc.every == 24.0);
    CHECK(sc.stress == 3.0);
    CHECK(sc.capacity == 0.25);
    CHECK_FALSE(sc.resuscitation.has_value());
    CHECK_FALSE(sc.permeability.has_value());
    CHECK(s.until == 30.0);
    CHECK(s.time_unit == TimeUnit::plain);
    CHECK(s.method == Method::exact_spatial);
    CHECK(s.sync == 0.02);
    CHECK(s.seed == 42);
    CHECK(s.threads == 3);
    CHECK(s.output_every == 0.5);
    CHECK(s.fields_every == 2.0);
    CHECK(s.frames_every == 0.25);
    CHECK(s.frame_scale == 6);
}

TEST_CASE("mutation_exponent = inf switches mutation off") {
    const Scenario s = parse_scenario("[rates]\nmutation_exponent = inf\n", "inf.toml");
    CHECK(std::isinf(s.rates.mutation_exponent));
    expect_error("[rates]\nmutation_exponent = -inf\n", 2, "rates.mutation_exponent", {"must be finite, got -inf", "or inf for no mutation"});
}

TEST_CASE("diagnostics read file:line: key: problem; accepted") {
    const auto ds = errors_of("title = \"x\"\n\n[rates]\ntransfer = -3\n");
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].to_string() == "bad.toml:4: rates.transfer: must be >= 0, got -3; accepted: a finite number >= 0");
}

TEST_CASE("rates must be finite and >= 0") {
    expect_error("[rates]\ndeath = -1\n", 2, "rates.death", {"must be >= 0, got -1"});
    expect_error("[rates]\n\nmigration = inf\n", 3, "rates.migration", {"must be finite, got inf"});
    expect_error("[rates]\ntransfer = nan\n", 2, "rates.transfer", {"nan"});
    expect_error("[[rates.override]]\ntrait = [0, 0]\ncompetition = -2\n", 3, "rates.override[1].competition",
                 {"must be >= 0, got -2"});
}

TEST_CASE("wrong types are errors") {
    expect_error("[scale]\nK = \"big\"\n", 2, "scale.K", {"must be a number, got string \"big\""});
    expect_error("[traits]\ndormancy = { max = 4.0, levels = \"3\" }\n", 2, "traits.dormancy.levels",
                 {"must be an integer"});
    expect_error("[rates]\ncompetition_counts_dormant = 1\n", 2, "rates.competition_counts_dormant",
                 {"must be true or false"});
    expect_error("traits = 3\n", 1, "traits", {"must be a table"});
    expect_error("[[inoculum]]\ntrait = [1]\nactive = 1\n", 2, "inoculum[1].trait", {"pair of numbers"});
    expect_error("[lattice]\nmap = 5\n", 2, "lattice.map", {"must be a string"});
}

TEST_CASE("unknown choices are errors with a suggestion") {
    expect_error("[run]\ntime_unit = \"logk\"\n", 2, "run.time_unit",
                 {"unknown value \"logk\"", "did you mean \"logK\"", "accepted: \"logK\" or \"plain\""});
    expect_error("[lattice]\nboundary = \"wrap\"\n", 2, "lattice.boundary", {"accepted: \"reflecting\", \"periodic\" or \"absorbing\""});
    expect_error("[run]\nmethod = \"exact_spatial\"\n", 2, "run.method", {"did you mean \"exact-spatial\""});
    expect_error("[rates]\ntransfer_form = \"dense\"\n", 2, "rates.transfer_form", {"density"});
    expect_error("[rates]\ntransfer_copies = \"all\"\n", 2, "rates.transfer_copies", {"transfer_only"});
    expect_error("[lattice]\nneighbourhood = 6\n", 2, "lattice.neighbourhood", {"4 or 8"});
}

TEST_CASE("the birth rate may not be negative at any trait, 0 is allowed") {
    // The defaults give b(4, 4) = 4 - 2 - 2 = 0: accepted.
    CHECK_NOTHROW(parse_scenario("", "zero.toml"));
    expect_error("[rates]\nbirth_max = 2.0\n", 2, "rates.birth_max",
                 {"is negative at b(2, 4) = -1, b(4, 2) = -1, b(4, 4) = -2; accepted: b >= 0 at every trait"});
    expect_error("[rates]\nbirth_cost_transfer = 1.0\n", 2, "rates.birth_max", {"b(4, 4) = -2"});
    // An override of that trait's birth rate fixes it.
    CHECK_NOTHROW(parse_scenario("[rates]\nbirth_cost_transfer = 0.75\n[[rates.override]]\ntrait = [4, 4]\nbirth = 0\n",
                                 "fixed.toml"));
}

TEST_CASE("dormancy probabilities are probabilities") {
    expect_error("[rates]\ndormancy_probability = 0.5\n", 2, "rates.dormancy_probability",
                 {"p * x_max = 0.5 * 4 = 2 is above 1", "accepted: p <= 0.25"});
    // The culprit may be the axis: then its line is named.
    expect_error("[traits]\ndormancy = { max = 20.0, levels = 3 }\n", 2, "rates.dormancy_probability",
                 {"0.1 * 20 = 2"});
    expect_error("[[rates.override]]\ntrait = [2, 2]\ndormancy_probability = 1.5\n", 3,
                 "rates.override[1].dormancy_probability", {"must be <= 1, got 1.5", "a number from 0 to 1"});
    expect_error("[rates]\nmutation_backward = 2\n", 2, "rates.mutation_backward", {"must be <= 1, got 2"});
}

TEST_CASE("trait axes: levels >= 1, max >= 0, and max > 0 with several levels") {
    expect_error("[traits]\ndormancy = { max = 4.0, levels = 0 }\n", 2, "traits.dormancy.levels",
                 {"must be >= 1, got 0"});
    expect_error("[traits]\ntransfer = { max = 4.0, levels = 2.5 }\n", 2, "traits.transfer.levels",
                 {"must be a whole number, got 2.5"});
    expect_error("[traits]\ntransfer = { max = -1.0, levels = 3 }\n", 2, "traits.transfer.max",
                 {"must be >= 0, got -1"});
    expect_error("[traits]\ntransfer = { max = 0.0, levels = 3 }\n", 2, "traits.transfer.max",
                 {"must be > 0 when levels > 1"});
    // One level switches the mechanism off; its max does not matter.
    const Scenario s = parse_scenario("[traits]\ntransfer = { max = 0.0, levels = 1 }\n", "one.toml");
    CHECK(s.transfer_axis.levels == 1);
}

TEST_CASE("K is finite, >= 1 and <= 1e18") {
    expect_error("[scale]\nK = 0.5\n", 2, "scale.K", {"must be >= 1, got 0.5", "a number from 1 to 1e18"});
    expect_error("[scale]\nK = 1e19\n", 2, "scale.K", {"must be <= 1e+18, got 1e+19"});
    expect_error("[scale]\nK = inf\n", 2, "scale.K", {"must be finite"});
}

TEST_CASE("lattice sizes are >= 1") {
    expect_error("[lattice]\nwidth = 0\n", 2, "lattice.width", {"must be >= 1, got 0"});
    expect_error("[lattice]\nheight = -4\n", 2, "lattice.height", {"must be >= 1, got -4"});
}

TEST_CASE("override and inoculum traits lie on the grid") {
    expect_error("[[rates.override]]\ntrait = [1.0, 0.0]\nbirth = 1\n", 2, "rates.override[1].trait",
                 {"trait [1, 0] is not on the grid", "dormancy one of 0, 2, 4 and transfer one of 0, 2, 4"});
    expect_error("[[rates.override]]\ntrait = [2, 0]\nbirth = 1\n[[rates.override]]\ntrait = [2.0, 0.0]\ndeath = 1\n", 5,
                 "rates.override[2].trait", {"already overridden by rates.override[1] (line 1)"});
    expect_error("[[inoculum]]\ntrait = [0.0, 5.0]\nactive = 10\n", 2, "inoculum[1].trait", {"trait [0, 5] is not on the grid"});
    expect_error("[[rates.override]]\nbirth = 1\n", 1, "rates.override[1].trait", {"missing"});
}

TEST_CASE("inoculum places lie inside the lattice and name real habitats") {
    const std::string lattice = "[lattice]\nwidth = 4\nheight = 3\n";
    expect_error(lattice + "[[inoculum]]\nwhere = \"patch:4,0\"\nactive = 1\n", 5, "inoculum[1].where",
                 {"patch reaches outside the lattice", "X from 0 to 3, Y from 0 to 2"});
    expect_error(lattice + "[[inoculum]]\nwhere = \"rect:0,0,3,3\"\nactive = 1\n", 5, "inoculum[1].where",
                 {"rectangle reaches outside"});
    expect_error(lattice + "[[inoculum]]\nwhere = \"patch:-1,0\"\nactive = 1\n", 5, "inoculum[1].where",
                 {"outside"});
    expect_error("[[inoculum]]\nwhere = \"habitat:opn\"\nactive = 1\n", 2, "inoculum[1].where",
                 {"no habitat is named \"opn\" (did you mean \"open\"?)"});
    expect_error("[[inoculum]]\nwhere = \"everywhere\"\nactive = 1\n", 2, "inoculum[1].where",
                 {"unknown place \"everywhere\"", "\"rect:X0,Y0,X1,Y1\""});
    expect_error("[[inoculum]]\nwhere = \"patch:1\"\nactive = 1\n", 2, "inoculum[1].where", {"as a patch"});
}

TEST_CASE("inoculum counts") {
    expect_error("[[inoculum]]\nactive = -1\n", 2, "inoculum[1].active", {"must be >= 0, got -1", "below 2^62"});
    expect_error("[[inoculum]]\nactive = 1e19\n", 2, "inoculum[1].active", {"must be < 4611686018427387904, got 1e+19"});
    expect_error("[[inoculum]]\nactive = 3\ndormant = 1.5\n", 3, "inoculum[1].dormant", {"must be a whole number, got 1.5"});
    expect_error("[[inoculum]]\nactive = 3\nexponent = 0.5\n", 3, "inoculum[1].exponent",
                 {"cannot be given together with active"});
    expect_error("[[inoculum]]\nwhere = \"all\"\n", 1, "inoculum[1]", {"adds no cells"});
    expect_error("[scale]\nK = 1e18\n[[inoculum]]\nexponent = 2\n", 4, "inoculum[1].exponent", {"too many"});
}

TEST_CASE("habitat classes: unique names, symbols and colours; properties >= 0") {
    expect_error("[[habitat]]\nname = \"a\"\n[[habitat]]\nname = \"a\"\nsymbol = \"b\"\n", 4, "habitat[2].name",
                 {"name \"a\" is also used by habitat[1]"});
    expect_error("[[habitat]]\nname = \"a\"\nsymbol = \"ab\"\n", 3, "habitat[1].symbol", {"must be one character"});
    expect_error("[[habitat]]\nname = \"a\"\nsymbol = \"x\"\n[[habitat]]\nname = \"b\"\nsymbol = \"x\"\n", 6,
                 "habitat[2].symbol", {"symbol \"x\" is also used by habitat[1]"});
    expect_error("[[habitat]]\nname = \"a\"\ncolour = \"red\"\n", 3, "habitat[1].colour", {"#rrggbb"});
    expect_error("[[habitat]]\nname = \"a\"\ncolour = \"#00ff00\"\n[[habitat]]\nname = \"b\"\ncolour = \"#00FF00\"\n", 6,
                 "habitat[2].colour", {"also used by habitat[1]"});
    expect_error("[[habitat]]\ncapacity = -1\n", 2, "habitat[1].capacity", {"must be >= 0, got -1"});
    expect_error("[[habitat]]\nstress = -0.5\n", 2, "habitat[1].stress", {"must be >= 0"});
    expect_error("[[habitat]]\nresuscitation = -1\n", 2, "habitat[1].resuscitation", {"must be >= 0"});
    expect_error("[[habitat]]\npermeability = inf\n", 2, "habitat[1].permeability", {"must be finite"});
}

TEST_CASE("schedules: a real habitat, end after start, every at least as long") {
    const std::string h = "[[habitat]]\nname = \"open\"\n[[habitat]]\nname = \"treated\"\nsymbol = \"T\"\n";
    expect_error(h + "[[schedule]]\nhabitat = \"treatd\"\nend = 2\nstress = 1\n", 7, "schedule[1].habitat",
                 {"no habitat is named \"treatd\" (did you mean \"treated\"?)", "accepted: open, treated"});
    expect_error(h + "[[schedule]]\nhabitat = \"treated\"\nstart = 5\nend = 5\nstress = 1\n", 9, "schedule[1].end",
                 {"must be after start (5), got 5"});
    expect_error(h + "[[schedule]]\nhabitat = \"treated\"\nstart = 5\nend = 8\nevery = 2\nstress = 1\n", 10,
                 "schedule[1].every", {"every >= end - start"});
    expect_error(h + "[[schedule]]\nhabitat = \"treated\"\nend = 8\nstress = -1\n", 9, "schedule[1].stress",
                 {"must be >= 0"});
    expect_error(h + "[[schedule]]\nhabitat = \"treated\"\nend = 8\n", 6, "schedule[1]", {"changes nothing"});
}

TEST_CASE("run and output settings") {
    expect_error("[run]\nuntil = 0\n", 2, "run.until", {"must be > 0, got 0"});
    expect_error("[run]\nsync = 0\n", 2, "run.sync", {"must be > 0, got 0", "plain time"});
    expect_error("[run]\nseed = -1\n", 2, "run.seed", {"must be >= 0, got -1"});
    expect_error("[run]\nseed = 1.5\n", 2, "run.seed", {"whole number"});
    expect_error("[run]\nthreads = -2\n", 2, "run.threads", {"must be >= 0, got -2"});
    expect_error("[output]\nevery = 0\n", 2, "output.every", {"must be > 0"});
    expect_error("[output]\nfields_every = -1\n", 2, "output.fields_every", {"must be >= 0, got -1"});
    expect_error("[output]\nframes_every = -1\n", 2, "output.frames_every", {"must be >= 0, got -1"});
    expect_error("[output]\nframe_scale = 0\n", 2, "output.frame_scale", {"must be >= 1, got 0"});
    const Scenario s = parse_scenario("[run]\nseed = 9223372036854775807\n", "seed.toml");
    CHECK(s.seed == 9223372036854775807ull);
}

TEST_CASE("unknown keys are errors with a did-you-mean") {
    expect_error("[rates]\ntransfr = 1\n", 2, "rates.transfr", {"unknown key; did you mean rates.transfer?"});
    expect_error("[rate]\ntransfer = 1\n", 1, "rate", {"did you mean rates?"});
    expect_error("[lattice]\nneighborhood = 8\n", 2, "lattice.neighborhood", {"did you mean lattice.neighbourhood?"});
    expect_error("[[habitat]]\ncolor = \"#000000\"\n", 2, "habitat[1].color", {"did you mean habitat[1].colour?"});
    expect_error("[traits]\ndormancy = { max = 4.0, level = 3 }\n", 2, "traits.dormancy.level",
                 {"did you mean traits.dormancy.levels?"});
    // Nothing close: the keys accepted there are listed.
    expect_error("[run]\nbanana = 1\n", 2, "run.banana", {"accepted here: until, time_unit, method, sync, seed, threads"});
}

TEST_CASE("all problems are reported together, in line order") {
    const auto ds = errors_of("[rates]\ndeath = -1\ntransfr = 2\n\n[scale]\nK = 0\n\n[run]\nuntil = -5\n");
    INFO(all_text(ds));
    REQUIRE(ds.size() == 4);
    CHECK(ds[0].line == 2);
    CHECK(ds[1].line == 3);
    CHECK(ds[2].line == 6);
    CHECK(ds[3].line == 9);
    try {
        parse_scenario("[rates]\ndeath = -1\n[run]\nuntil = -5\n", "two.toml");
    } catch (const ScenarioError& e) {
        CHECK(std::string(e.what()) ==
              "two.toml:2: rates.death: must be >= 0, got -1; accepted: a finite number >= 0\n"
              "two.toml:4: run.until: must be > 0, got -5; accepted: a finite number > 0");
    }
}

TEST_CASE("TOML syntax errors and missing files are diagnostics") {
    const auto ds = errors_of("[rates]\ndeath = 1\ntransfer = = 2\n");
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].file == "bad.toml");
    CHECK(ds[0].line == 3);
    CHECK(ds[0].message.find("not valid TOML") != std::string::npos);
    try {
        load_scenario("/nonexistent/folder/none.toml");
        FAIL("loaded a missing file");
    } catch (const ScenarioError& e) {
        REQUIRE(e.diagnostics().size() == 1);
        CHECK(e.diagnostics()[0].file == "/nonexistent/folder/none.toml");
        CHECK(e.diagnostics()[0].message.find("cannot open the scenario file") != std::string::npos);
    }
}

TEST_CASE("overrides given with --set go through the same checks") {
    const std::string file = "[rates]\ntransfer = 10.0\n[[habitat]]\nname = \"open\"\n";
    const Scenario s = parse_scenario(file, "set.toml",
                                      {"rates.transfer=0", "scale.K=1e5", "run.method=exact", "traits.dormancy.levels=5",
                                       "title=two words", "habitat[1].stress=2", "rates.mutation_exponent=inf",
                                       "run.time_unit=\"plain\""});
    CHECK(s.rates.transfer == 0.0);
    CHECK(s.K == 1e5);
    CHECK(s.method == Method::exact);
    CHECK(s.dormancy_axis.levels == 5);
    CHECK(s.title == "two words");
    CHECK(s.habitats[0].stress == 2.0);
    CHECK(std::isinf(s.rates.mutation_exponent));
    CHECK(s.time_unit == TimeUnit::plain);
    CHECK(parse_scenario(file, "set.toml", {"run.method=\"leap\""}).method == Method::leap);

    auto ds = errors_of(file, {"rates.transfer=-1"});
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].to_string() == "--set: rates.transfer: must be >= 0, got -1; accepted: a finite number >= 0");

    ds = errors_of(file, {"rates.transfr=0"});
    REQUIRE(ds.size() == 1);
    CHECK(ds[0].file == "--set");
    CHECK(ds[0].key == "rates.transfr");
    CHECK(ds[0].message.find("did you mean rates.transfer?") != std::string::npos);

    ds = errors_of(file, {"run.method=fast"});
    CHECK(only_about(ds, "run.method").message.find("unknown value \"fast\"") != std::string::npos);

    ds = errors_of(file, {"rates.transfer"});
    CHECK(only_about(ds, "rates.transfer").message.find("has no '='") != std::string::npos);

    ds = errors_of(file, {"rates.transfer.x=1"});
    CHECK(only_about(ds, "rates.transfer.x").message.find("rates.transfer is not a table") != std::string::npos);

    ds = errors_of(file, {"inoculum[1].active=5"});
    CHECK(only_about(ds, "inoculum[1].active").message.find("there is no inoculum[1]") != std::string::npos);

    // A file error and an override error are reported together, the file's first.
    ds = errors_of("[rates]\ndeath = -1\n", {"scale.K=0"});
    REQUIRE(ds.size() == 2);
    CHECK(ds[0].file == "bad.toml");
    CHECK(ds[1].file == "--set");
    CHECK(ds[1].key == "scale.K");
}

TEST_CASE("text maps") {
    const fs::path dir = temp_dir("text");
    write_file(dir / "map.txt", "; a 4 x 3 map\n..TT\n.##T\n\n; comment\n....  \n");
    const std::string habitats =
        "[[habitat]]\nname = \"open\"\n"
        "[[habitat]]\nname = \"treated\"\nsymbol = \"T\"\nstress = 1\n"
        "[[habitat]]\nname = \"wall\"\nsymbol = \"#\"\ncapacity = 0\n";
    write_file(dir / "good.toml", "[lattice]\nmap = \"map.txt\"\n" + habitats);
    const Scenario s = load_scenario((dir / "good.toml").string());
    CHECK(s.width == 4);
    CHECK(s.height == 3);
    CHECK(s.map == "map.txt");
    CHECK(s.map_path == fs::absolute(dir / "map.txt").lexically_normal().string());
    CHECK(s.habitat_of_patch == std::vector<std::uint16_t>{0, 0, 1, 1, 0, 2, 2, 1, 0, 0, 0, 0});

    // The scenario may repeat the size; then it must agree.
    write_file(dir / "agree.toml", "[lattice]\nwidth = 4\nheight = 3\nmap = \"map.txt\"\n" + habitats);
    CHECK_NOTHROW(load_scenario((dir / "agree.toml").string()));
    write_file(dir / "disagree.toml", "[lattice]\nwidth = 5\nmap = \"map.txt\"\n" + habitats);
    try {
        load_scenario((dir / "disagree.toml").string());
        FAIL("a map of the wrong size loaded");
    } catch (const ScenarioError& e) {
        REQUIRE(e.diagnostics().size() == 1);
        const Diagnostic& d = e.diagnostics()[0];
        CHECK(d.line == 2);
        CHECK(d.key == "lattice.width");
        CHECK(d.message.find("is 5 but the map") != std::string::npos);
        CHECK(d.message.find("is 4 patches wide") != std::string::npos);
    }

    // A character that is no habitat's symbol: the map file, its line and the column.
    write_file(dir / "badchar.txt", "..\n.x\n");
    write_file(dir / "badchar.toml", "[lattice]\nmap = \"badchar.txt\"\n" + habitats);
    try {
        load_scenario((dir / "badchar.toml").string());
        FAIL("a bad map loaded");
    } catch (const ScenarioError& e) {
        REQUIRE(e.diagnostics().size() == 1);
        const Diagnostic& d = e.diagnostics()[0];
        CHECK(d.file == (dir / "badchar.txt").string());
        CHECK(d.line == 2);
        CHECK(d.key == "lattice.map");
        CHECK(d.message.find("character 'x' at column 2 (patch X=1, Y=1) is no habitat's symbol") != std::string::npos);
        CHECK(d.message.find("'T' (treated)") != std::string::npos);
    }

    write_file(dir / "ragged.txt", "...\n..\n");
    write_file(dir / "ragged.toml", "[lattice]\nmap = \"ragged.txt\"\n");
    try {
        load_scenario((dir / "ragged.toml").string());
        FAIL("a ragged map loaded");
    } catch (const ScenarioError& e) {
        const Diagnostic& d = e.diagnostics().at(0);
        CHECK(d.line == 2);
        CHECK(d.message.find("row 1 has 2 characters but the first row (line 1) has 3") != std::string::npos);
    }

    // A map needs a distinct symbol for every class.
    write_file(dir / "same.toml", "[lattice]\nmap = \"map.txt\"\n[[habitat]]\nname = \"a\"\n[[habitat]]\nname = \"b\"\n");
    CHECK_THROWS_WITH(load_scenario((dir / "same.toml").string()), Catch::Contains("both have the symbol '.'"));

    write_file(dir / "missing.toml", "[lattice]\n\nmap = \"nothere.txt\"\n");
    try {
        load_scenario((dir / "missing.toml").string());
        FAIL("a missing map loaded");
    } catch (const ScenarioError& e) {
        const Diagnostic& d = e.diagnostics().at(0);
        CHECK(d.line == 3);
        CHECK(d.key == "lattice.map");
        CHECK(d.message.find("no map file") != std::string::npos);
    }
    write_file(dir / "format.toml", "[lattice]\nmap = \"map.bmp\"\n");
    CHECK_THROWS_WITH(load_scenario((dir / "format.toml").string()), Catch::Contains("a PNG image ending in .png"));
}

TEST_CASE("PNG maps") {
    const fs::path dir = temp_dir("png");
    sf::Image image;
    image.create(3, 2, sf::Color(0xd8, 0xd8, 0xd8));
    image.setPixel(2, 0, sf::Color(0xaa, 0x20, 0x20));
    image.setPixel(1, 1, sf::Color(0x10, 0x10, 0x10));
    REQUIRE(image.saveToFile((dir / "map.png").string()));
    const std::string habitats =
        "[[habitat]]\nname = \"open\"\n"
        "[[habitat]]\nname = \"treated\"\nsymbol = \"T\"\ncolour = \"#AA2020\"\n"
        "[[habitat]]\nname = \"wall\"\nsymbol = \"#\"\ncolour = \"#101010\"\ncapacity = 0\n";
    write_file(dir / "good.toml", "[lattice]\nmap = \"map.png\"\n" + habitats);
    const Scenario s = load_scenario((dir / "good.toml").string());
    CHECK(s.width == 3);
    CHECK(s.height == 2);
    CHECK(s.habitat_of_patch == std::vector<std::uint16_t>{0, 0, 1, 0, 2, 0});

    // A colour that is no habitat's: the pixel's column, row and colour.
    image.setPixel(0, 1, sf::Color(0x12, 0x34, 0x56));
    image.setPixel(1, 0, sf::Color(0x12, 0x34, 0x56));
    REQUIRE(image.saveToFile((dir / "bad.png").string()));
    write_file(dir / "bad.toml", "[lattice]\nmap = \"bad.png\"\n" + habitats);
    try {
        load_scenario((dir / "bad.toml").string());
        FAIL("a bad image loaded");
    } catch (const ScenarioError& e) {
        REQUIRE(e.diagnostics().size() == 1);
        const Diagnostic& d = e.diagnostics()[0];
        CHECK(d.file == (dir / "bad.png").string());
        CHECK(d.key == "lattice.map");
        CHECK(d.message.find("pixel at column 1, row 0 has colour #123456") != std::string::npos);
        CHECK(d.message.find("1 other pixels") != std::string::npos);
        CHECK(d.message.find("#aa2020 (treated)") != std::string::npos);
    }

    write_file(dir / "junk.png", "this is not an image");
    write_file(dir / "junk.toml", "[lattice]\nmap = \"junk.png\"\n");
    CHECK_THROWS_WITH(load_scenario((dir / "junk.toml").string()), Catch::Contains("cannot read the image"));

    write_file(dir / "size.toml", "[lattice]\nheight = 3\nmap = \"map.png\"\n" + habitats);
    CHECK_THROWS_WITH(load_scenario((dir / "size.toml").string()), Catch::Contains("is 2 patches high"));
}

TEST_CASE("the resolved scenario reads back to an equal Scenario") {
    const fs::path dir = temp_dir("resolved");
    fs::create_directories(dir / "scenario" / "maps");
    fs::create_directories(dir / "out");
    write_file(dir / "scenario" / "maps" / "map.txt", ".T.T.\n.....\n##...\n..T..\n");
    std::string text = full_example;
    text.replace(text.find("boundary = \"periodic\"\n"), 22, "boundary = \"periodic\"\nmap = \"maps/map.txt\"\n");
    text += "\n[[habitat]]\nname = \"wall\"\nsymbol = \"#\"\ncolour = \"#000000\"\ncapacity = 0\n";
    // Numbers that have no short decimal form, and no mutation at all.
    text.replace(text.find("death = 0.75"), 12, "death = 0.1234567890123456789");
    text.replace(text.find("K = 1e6"), 7, "K = 3.3333333333333333e7");
    text.replace(text.find("mutation_exponent = 0.625"), 25, "mutation_exponent = inf");
    write_file(dir / "scenario" / "s.toml", text);

    const Scenario original = load_scenario((dir / "scenario" / "s.toml").string(), {"rates.transfer=1e-300"});
    REQUIRE(original.habitat_of_patch.size() == 20);
    const std::string resolved = resolved_scenario_toml(original);
    CHECK(resolved.find("[provenance]") != std::string::npos);
    CHECK(resolved.find("build_id") != std::string::npos);
    write_file(dir / "out" / "scenario.resolved.toml", resolved);
    // Moved away from its map, the resolved file still loads (the map path is absolute).
    fs::rename(dir / "scenario" / "s.toml", dir / "scenario" / "moved.toml");

    Scenario back = load_scenario((dir / "out" / "scenario.resolved.toml").string());
    INFO(resolved);
    CHECK(back.map == original.map_path);  // written absolute
    CHECK(back.map_path == original.map_path);
    back.source_path = original.source_path;
    back.map = original.map;
    CHECK(back.rates == original.rates);
    CHECK(back.habitats == original.habitats);
    CHECK(back.inocula == original.inocula);
    CHECK(back.schedules == original.schedules);
    CHECK(back == original);
    CHECK(back.rates.death == 0.1234567890123456789);
    CHECK(back.rates.transfer == 1e-300);

    // Writing the read-back scenario gives the same text, apart from the provenance.
    back.source_path = (dir / "out" / "scenario.resolved.toml").string();
    const std::string again = resolved_scenario_toml(back);
    CHECK(again.substr(0, again.find("[provenance]")) == resolved.substr(0, resolved.find("[provenance]")));

    // The defaults round-trip as well.
    const Scenario minimal = parse_scenario("", "min.toml");
    Scenario minimal_back = parse_scenario(resolved_scenario_toml(minimal), "min.resolved.toml");
    minimal_back.source_path = minimal.source_path;
    CHECK(minimal_back == minimal);
}
