// The scenario loader's rules between values, unknown keys, collected diagnostics and --set.
#include "scenario_test_support.hpp"

using namespace tessera;
using namespace tessera::scenario_test;

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
