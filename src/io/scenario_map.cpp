// Step 3 of loading: the lattice's habitat classes, from [lattice] map or all class 0.
#include <algorithm>
#include <filesystem>

#include "io/habitat_map.hpp"
#include "io/scenario_findings.hpp"

namespace tessera::scenario_io {

namespace fs = std::filesystem;

namespace {

std::string lower_extension(const fs::path& p) {
    std::string e = p.extension().string();
    for (char& c : e) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return e;
}

// A map size agrees with the scenario's width or height, or the scenario leaves it out.
void agree(Findings& f, const char* key, int& value, int from_map, const std::string& map_name,
           const char* dimension) {
    const std::string full = std::string("lattice.") + key;
    if (f.has(full) && value != from_map) {
        f.add(full, "is " + std::to_string(value) + " but the map " + map_name + " is " + std::to_string(from_map) +
                        " patches " + dimension + "; accepted: " + std::to_string(from_map) + ", or leave " + key +
                        " out to take it from the map");
    }
    value = from_map;
}

bool ext_known(const fs::path& p) { return lower_extension(p) == ".txt" || lower_extension(p) == ".png"; }

}  // namespace

void apply_habitat_map(Scenario& s, Findings& f) {
    s.map_path.clear();
    if (s.map.empty()) {
        // The size was range-checked when read; a lattice too large is reported by the checks.
        const double patches = static_cast<double>(s.width) * s.height;
        if (s.width >= 1 && s.height >= 1 && patches <= 1e8)
            s.habitat_of_patch.assign(static_cast<std::size_t>(patches), 0);
        return;
    }
    // Relative to the scenario file's folder, so a scenario and its map travel together.
    fs::path shown = fs::path(s.map);
    if (shown.is_relative()) shown = fs::path(s.source_path).parent_path() / shown;
    shown = shown.lexically_normal();
    std::error_code ec;
    fs::path absolute = fs::absolute(shown, ec);
    s.map_path = (ec ? shown : absolute.lexically_normal()).string();

    if (!fs::exists(shown, ec) && ext_known(shown)) {
        f.add("lattice.map", "no map file " + shown.string() + "; accepted: a path relative to the scenario file's "
                                                              "folder, or an absolute path");
        return;
    }
    HabitatMap map;
    const std::string ext = lower_extension(shown);
    if (ext == ".txt") {
        map = read_text_map(s.map_path, s.habitats);
    } else if (ext == ".png") {
        map = read_image_map(s.map_path, s.habitats);
    } else {
        f.add("lattice.map", "cannot tell the map's format from " + shown.filename().string() +
                                 "; accepted: a text map ending in .txt or a PNG image ending in .png");
        return;
    }
    if (!map.problems.empty()) {
        for (const MapProblem& p : map.problems) f.add(Place{shown.string(), p.line}, "lattice.map", p.message);
        return;
    }
    agree(f, "width", s.width, map.width, shown.string(), "wide");
    agree(f, "height", s.height, map.height, shown.string(), "high");
    s.habitat_of_patch = std::move(map.habitat_of_patch);
}

}  // namespace tessera::scenario_io
