// Trait colours: one colour per trait of a dormancy x transfer grid (any nx x ny; designed
// and tested for up to 5 x 5 = 25 traits), our own scheme.
//
// Design. In CIELAB (L lightness, C chroma, h hue angle):
//   * dormancy ability x sets the lightness: L = 30 (no dormancy, deep) .. 76 (highest
//     dormancy, pale), so "how readily it sleeps" reads as "how faded it looks";
//   * transfer ability y sets the hue: from violet-blue (h = 268 deg, no transfer) through
//     azure and teal to green (h = 128 deg, highest transfer), eased (y^0.65) so that the
//     low levels, which sit in the dense blue region, get wider steps;
//   * chroma is as high as the sRGB gamut allows at that lightness and hue (up to 90..110).
// Why this hue path: a red-green dichromat sees colour mostly along a blue-yellow line.
// Going from blue through cyan to green moves the colour steadily along that line, so the
// transfer axis stays readable to them; a path through red or orange would not.
//
// How it was checked (tests/trait_palette_test.cpp): for every grid nx, ny in 1..5 the
// minimum pairwise CIEDE2000 distance between trait colours is above 8 for normal vision
// and above 5 after simulating protanopia and deuteranopia with the matrices of Machado,
// Oliveira & Fernandes (2009) (render/colour_vision.hpp). Parameters were chosen by a
// small search over this family maximising those minimum distances.
#pragma once

#include <vector>

#include "core/trait_grid.hpp"
#include "render/colour_lab.hpp"

namespace tessera {

class TraitPalette {
public:
    TraitPalette(int x_levels, int y_levels);
    explicit TraitPalette(const TraitGrid& grid) : TraitPalette(grid.x_levels(), grid.y_levels()) {}

    int x_levels() const { return x_levels_; }
    int y_levels() const { return y_levels_; }
    int size() const { return static_cast<int>(colours_.size()); }

    // Colour of trait index = x_level * y_levels + y_level (the order of TraitGrid).
    Rgb8 colour(int trait) const { return colours_[static_cast<std::size_t>(trait)]; }
    Rgb8 colour(int x_level, int y_level) const { return colour(x_level * y_levels_ + y_level); }
    const std::vector<Rgb8>& colours() const { return colours_; }

    // The colour at a position of the continuous design space, sx and sy in [0, 1].
    static Rgb8 at(double sx, double sy);

private:
    int x_levels_;
    int y_levels_;
    std::vector<Rgb8> colours_;
};

}  // namespace tessera
