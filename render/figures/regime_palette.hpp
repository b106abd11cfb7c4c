// Colours of the sweep regimes (extinct, resident, coexistence, cycling), our own choice:
// a neutral grey for "nothing lives", then blue, amber and brick red, which differ in
// lightness and along the blue-yellow axis that protanopes and deuteranopes keep. Checked in
// tests/figures_test.cpp with CIEDE2000 (render/colour_lab.hpp) for normal vision and after
// simulating both dichromacies (render/colour_vision.hpp): min pairwise distance > 20 full,
// > 15 for dichromats; and the paler shades used for partly agreeing replicates stay apart.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "render/colour_lab.hpp"

namespace tessera {

const std::vector<std::string>& regime_names();  // extinct, resident, coexistence, cycling
std::optional<Rgb8> regime_colour(const std::string& regime);

// The colour shown for a cell where a fraction `agree` (0..1) of the replicates are in the
// regime: mixed towards white in linear light, from full colour at 1 to `regime_pale` at 0.
Rgb8 regime_shade(Rgb8 colour, double agree);
inline constexpr double regime_pale = 0.3;

}  // namespace tessera
