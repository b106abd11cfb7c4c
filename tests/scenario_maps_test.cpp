// Text and PNG habitat maps, and the resolved scenario reading back to an equal Scenario.
#include "scenario_test_support.hpp"

using namespace tessera;
using namespace tessera::scenario_test;

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
