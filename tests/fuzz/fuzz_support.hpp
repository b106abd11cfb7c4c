// Shared by the fuzz targets: a private folder for the files a target must hand the loaders
// by path, and the small habitat table the map targets read against.
#pragma once

#include <unistd.h>

#include <cstddef>
#include <cstdio>
#include <cstdlib>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "core/scenario.hpp"
#include "io/habitat_map.hpp"

namespace tessera::fuzz {

// A folder of this process's own (libFuzzer's -jobs/-workers run several processes side by
// side), made once and reused for every input.
inline const std::filesystem::path& work_dir() {
    static const std::filesystem::path dir = [] {
        auto d = std::filesystem::temp_directory_path() / ("tessera-fuzz-" + std::to_string(::getpid()));
        std::filesystem::create_directories(d);
        return d;
    }();
    return dir;
}

inline std::string write_file(const std::string& name, const std::uint8_t* data, std::size_t size) {
    const std::filesystem::path p = work_dir() / name;
    std::ofstream out(p, std::ios::binary | std::ios::trunc);
    out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
    return p.string();
}

// Three classes with distinct symbols and colours, as a scenario with a map would have.
inline std::vector<Habitat> habitats() {
    std::vector<Habitat> h(3);
    h[0].name = "open";
    h[0].symbol = ".";
    h[0].colour = "#d8d8d8";
    h[1].name = "wall";
    h[1].symbol = "#";
    h[1].colour = "#000000";
    h[1].capacity = 0.0;
    h[2].name = "treated";
    h[2].symbol = "T";
    h[2].colour = "#8fa8d8";
    return h;
}

// A map that reports no problem must be whole: width x height patches, each of a class that
// exists. Anything else is a loader bug; abort() makes libFuzzer keep the input.
inline void check_map(const HabitatMap& m, std::size_t classes) {
    if (!m.problems.empty()) return;
    if (m.width < 1 || m.height < 1) std::abort();
    if (m.habitat_of_patch.size() != static_cast<std::size_t>(m.width) * static_cast<std::size_t>(m.height))
        std::abort();
    for (std::uint16_t c : m.habitat_of_patch)
        if (c >= classes) std::abort();
}

}  // namespace tessera::fuzz
