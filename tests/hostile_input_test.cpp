// Hostile input (docs/reliability.md): numbers that would overflow a count, a patch's scale
// or the machine's memory are refused with the limit named, never wrapped; and the inputs
// the fuzzers found are regression cases here.
#include <catch2/catch.hpp>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "io/habitat_map.hpp"
#include "io/scenario_loader.hpp"
#include "io/scenario_writer.hpp"

using namespace tessera;
using namespace std::string_literals;
namespace fs = std::filesystem;

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
    // The refusal says what it would take and what this machine has (issue 14): 1e14 counts
    // of 16 + 64 bytes each are 8e15 bytes, 7.1 PiB.
    CHECK_THAT(wide, Catch::Contains("it would need about 7.1 PiB of memory; this machine has "));
    CHECK_THAT(errors_of("[lattice]\nwidth = 100000\nheight = 100000\n"), Catch::Contains("of memory; this machine has "));
    // The same through --set.
    CHECK_THAT(errors_of("", {"lattice.width=10000", "lattice.height=10000", "traits.dormancy.levels=10"}),
               Catch::Contains("patches x traits <= 1e9"));
    // At the limit exactly: 1e6 patches x 1000 traits.
    CHECK_NOTHROW(parse_scenario("[traits]\ndormancy = { max = 1.0, levels = 1000 }\ntransfer = { max = 1.0, levels = 1 }\n"
                                 "[lattice]\nwidth = 1000\nheight = 1000\n",
                                 "ok.toml"));
}

// Found by fuzz_scenario: habitats that all keep the default colour loaded, but their
// resolved file wrote that colour on each and was refused as "also used by habitat[1]".
TEST_CASE("a resolved scenario whose habitats share default symbols or colours loads back") {
    const Scenario s = parse_scenario("[[habitat]]\nname = \"a\"\nsymbol = \"a\"\n[[habitat]]\nname = \"b\"\n"
                                      "colour = \"#000000\"\n[[habitat]]\nname = \"c\"\n",
                                      "shared.toml");
    Scenario back = parse_scenario(resolved_scenario_toml(s), "shared.resolved.toml");
    back.source_path = s.source_path;
    CHECK(back == s);
}

// Found by fuzz_image_map: a 63-byte BMP named .png whose header claimed 2 x 16777216 pixels
// was decoded for minutes. Only PNG is read now, and its size is checked before decoding.
TEST_CASE("map images: PNG only, their size checked from the header before decoding") {
    const fs::path dir = fs::temp_directory_path() / ("tessera_hostile_" + std::to_string(::getpid()));
    fs::create_directories(dir);
    const std::vector<Habitat> classes(1);
    auto problem_of = [&](const std::string& name, const std::string& bytes) {
        std::ofstream(dir / name, std::ios::binary) << bytes;
        const HabitatMap m = read_image_map((dir / name).string(), classes);
        REQUIRE(m.problems.size() == 1);
        return m.problems[0].message;
    };
    std::string bmp = "BM>\0\0\0\0\0006\0\0\0(\0\0\0\2\0\0\0\0\0\0\1\1\0\030\0"s;
    bmp.resize(63, '\0');
    CHECK_THAT(problem_of("bmp.png", bmp), Catch::Contains("not a PNG file"));
    CHECK_THAT(problem_of("empty.png", ""), Catch::Contains("the file is empty"));
    // A PNG header claiming 100000 x 100000 pixels and nothing else.
    std::string png = "\x89PNG\r\n\x1a\n\0\0\0\x0dIHDR\0\x01\x86\xa0\0\x01\x86\xa0\x08\x02\0\0\0\0\0\0\0"s;  // ... CRC
    CHECK_THAT(problem_of("huge.png", png), Catch::Contains("100000 x 100000 pixels, more than 1e8"));
    CHECK_THAT(problem_of("short.png", png.substr(0, 20)), Catch::Contains("truncated before its IHDR"));
    // Found by fuzz_image_map: a 3 x 2 PNG of 79 bytes whose IDAT chunk claimed 1.3 GB made
    // the decoder grow its buffer that far (minutes under ASan).
    std::string small = "\x89PNG\r\n\x1a\n\0\0\0\x0dIHDR\0\0\0\x03\0\0\0\x02\x08\x02\0\0\0\x12\x16\xfc\xf1"
                        "\x4d\xff\0\x16IDATx\x9c"s;
    small.resize(79, '\0');
    CHECK_THAT(problem_of("idat.png", small), Catch::Contains("a chunk at byte 33 claims 1308557334 bytes"));
    // Found by fuzz_image_map: a 3 x 2 PNG whose damaged deflate stream the bundled decoder
    // inflated for ever (it reads zeros past the end). zlib checks the stream first now.
    std::ifstream seed(fs::path(TESSERA_SOURCE_DIR) / "tests/fuzz/corpus/image_map/regress_inflates_forever.png",
                       std::ios::binary);
    const std::string forever((std::istreambuf_iterator<char>(seed)), std::istreambuf_iterator<char>());
    REQUIRE(forever.size() == 79);
    CHECK_THAT(problem_of("forever.png", forever), Catch::Contains("image data is damaged or truncated"));
    fs::remove_all(dir);
}

// Found by fuzz_scenario: an override whose value was not UTF-8 was kept as a bare string and
// loaded, but its resolved file was no valid TOML.
TEST_CASE("values given with --set must be UTF-8 text") {
    CHECK_THAT(errors_of("[[habitat]]\nname = \"a\"\n", {"habitat[1].name=bz .bir\xff\xff\xff\xfa"}),
               Catch::Contains("not valid UTF-8"));
    CHECK_THAT(errors_of("", {"title=\xc0\xaf"}), Catch::Contains("not valid UTF-8"));  // an overlong '/'
    CHECK_THAT(errors_of("", {"title=\xed\xa0\x80"}), Catch::Contains("not valid UTF-8"));  // a surrogate
    CHECK_THAT(errors_of("", {"title=\xe2\x82"}), Catch::Contains("not valid UTF-8"));  // cut short
    CHECK(parse_scenario("", "ok.toml", {"title=caf\xc3\xa9 \xe2\x82\xac \xf0\x9f\xa6\xa0"}).title ==
          "caf\xc3\xa9 \xe2\x82\xac \xf0\x9f\xa6\xa0");
}

TEST_CASE("an empty scenario file, or one of comments only, is refused rather than run on defaults") {
    namespace fs = std::filesystem;
    const fs::path dir = fs::temp_directory_path() / "tessera-empty-scenario";
    fs::create_directories(dir);
    for (const char* text : {"", "\n\n", "# only a comment\n   # and another\n"}) {
        const fs::path file = dir / "nothing.toml";
        std::ofstream(file) << text;
        try {
            load_scenario(file.string());
            FAIL("an empty scenario was accepted");
        } catch (const ScenarioError& e) {
            CHECK_THAT(e.what(), Catch::Contains(file.string()));
            CHECK_THAT(e.what(), Catch::Contains("holds no settings"));
            CHECK_THAT(e.what(), Catch::Contains("at least one setting"));
        }
    }
    // One setting is enough.
    std::ofstream(dir / "one.toml") << "title = \"x\"\n";
    CHECK_NOTHROW(load_scenario((dir / "one.toml").string()));
    fs::remove_all(dir);
}
