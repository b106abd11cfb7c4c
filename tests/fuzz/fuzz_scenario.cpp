// libFuzzer target: the scenario loader on arbitrary text, with --set overrides.
//
// The input is the scenario text, then optionally a NUL byte and the overrides, one per
// NUL-separated piece ("rates.transfer=0"). The scenario sits in a folder that holds a small
// text map (map.txt) and image map (map.png), so `lattice.map` can lead the fuzzer into the
// map readers too.
//
// The contract checked: parse_scenario returns a Scenario or throws ScenarioError, nothing
// else (any other exception escapes and libFuzzer reports it); and a Scenario it returns
// writes out as a resolved file that reads back to an equal Scenario.
#include <SFML/Graphics/Image.hpp>

#include "fuzz_support.hpp"
#include "io/scenario_loader.hpp"
#include "io/scenario_writer.hpp"

namespace {

std::string scenario_name() {
    static const std::string name = [] {
        const auto& dir = tessera::fuzz::work_dir();
        std::ofstream(dir / "map.txt") << ".T.\n#..\n";
        sf::Image png;
        png.create(3, 2, sf::Color(0xd8, 0xd8, 0xd8));
        png.setPixel(1, 0, sf::Color(0x8f, 0xa8, 0xd8));
        png.setPixel(0, 1, sf::Color::Black);
        png.saveToFile((dir / "map.png").string());
        return (dir / "scenario.toml").string();
    }();
    return name;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string input(reinterpret_cast<const char*>(data), size);
    std::size_t end = input.find('\0');
    const std::string text = input.substr(0, end);
    std::vector<std::string> overrides;
    while (end != std::string::npos) {
        const std::size_t next = input.find('\0', end + 1);
        overrides.push_back(input.substr(end + 1, next == std::string::npos ? std::string::npos : next - end - 1));
        end = next;
    }
    const std::string name = scenario_name();
    tessera::Scenario s;
    try {
        s = tessera::parse_scenario(text, name, overrides);
    } catch (const tessera::ScenarioError&) {
        return 0;  // bad input, reported: what should happen
    }
    // The resolved file must load back to the same Scenario (its map path is absolute).
    tessera::Scenario back;
    const std::string resolved = tessera::resolved_scenario_toml(s);
    try {
        back = tessera::parse_scenario(resolved, name);
    } catch (const tessera::ScenarioError& e) {
        std::fprintf(stderr, "resolved scenario does not load back:\n%s\n--- resolved:\n%s\n", e.what(), resolved.c_str());
        std::abort();
    }
    back.map = s.map;
    if (!(back == s)) {
        std::fprintf(stderr, "resolved scenario loads back different:\n%s\n", resolved.c_str());
        std::abort();
    }
    return 0;
}
