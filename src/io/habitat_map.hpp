// Habitat maps: a text file (one character per patch) or a PNG image (one pixel per patch)
// that assigns every patch of the lattice a habitat class.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "core/scenario.hpp"

namespace tessera {

struct MapProblem {
    int line = 0;  // line of a text map (from 1); 0 for images and whole-file problems
    std::string message;
};

struct HabitatMap {
    int width = 0;
    int height = 0;
    std::vector<std::uint16_t> habitat_of_patch;  // row-major, top row first
    std::vector<MapProblem> problems;             // empty when the map is usable
};

// Reads a text map: rows top first, `;` comment lines and empty lines skipped, trailing
// spaces ignored, every character the `symbol` of one of `habitats`.
HabitatMap read_text_map(const std::string& path, const std::vector<Habitat>& habitats);

// Reads a PNG image (PNG only: its size is checked from its header before any decoding):
// every pixel's colour (alpha ignored) must equal the `colour` of one of `habitats`.
HabitatMap read_image_map(const std::string& path, const std::vector<Habitat>& habitats);

}  // namespace tessera
