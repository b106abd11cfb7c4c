// The scenario loader (src/io): defaults, every key, and the single-value checks.
#include "scenario_test_support.hpp"

using namespace tessera;
using namespace tessera::scenario_test;

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
    CHECK(s.habitat_outlines);
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
    CHECK(sc.name == "antibiotic pulse");
    CHECK(s.schedule_name(0) == "antibiotic pulse");
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
    CHECK_FALSE(s.habitat_outlines);
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
