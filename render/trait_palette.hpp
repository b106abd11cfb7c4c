// Trait colours: one colour per trait of a dormancy x transfer grid (any nx x ny; designed
// and tested for up to 5 x 5 = 25 traits), our own scheme.
//
// What it has to do. In the dominant-trait view brightness already means "how full the
// patch is" (the colour is dimmed towards the empty colour as the patch empties, see
// fill_shade in render/rasteriser.hpp). So trait identity must live mostly in hue, not in
// lightness, and every trait must be bright when its patch is full: a full patch of any
// trait reads brighter than a half-empty patch of any other.
//
// Design. An affine map of the design square (sx, sy) in [0, 1]^2 into CIELAB, all of it at
// high lightness:
//   * transfer ability y moves along b* (+105 from no to highest transfer): from sky blue
//     or lavender to golden yellow or orange. Blue-yellow is the opponent direction that
//     protanopes and deuteranopes keep, so this axis reads the same for them;
//   * dormancy ability x moves along a* (+67 from never to most ready to sleep): from
//     cyan and lime (top row of the legend) to violet, pink and coral (bottom row), so the
//     rows differ in hue and keep it when dimmed. Red-green dichromats lose most of a*, so
//     this axis also takes a moderate lightness step (L* -19) and a pull towards blue
//     (b* -38), which they do see; normal vision gets hue first, lightness second;
//   * a small twist (a* -25 (sx - 1/2)(sy - 1/2)) keeps the four corners apart;
//   * colours outside the sRGB gamut keep their L* and hue and lose chroma (bisection).
//   L* = 82 - 19 sx + 8 sy: every full colour has L* >= 63, against 7 for empty patches.
// The numbers came from a small random search over this family that maximised the least
// pairwise CIEDE2000 distance, for normal vision, for both dichromacies and for colours
// dimmed to half fullness, with L* >= 62 and the axes monotone as constraints; then rounded.
//
// How it is checked (tests/trait_palette_test.cpp), for every grid nx, ny in 1..5:
//   * min pairwise CIEDE2000 > 7 for normal vision;
//   * > 3 after simulating protanopia and deuteranopia (Machado, Oliveira & Fernandes 2009,
//     severity 1; render/colour_vision.hpp), applied to the 8-bit colours;
//   * > 5 for all colours dimmed to half fullness (fill 0.5), as drawn by the rasteriser;
//   * every full colour has L* > 60; b* rises with transfer level and a* with dormancy
//     level in every row and column, by a clear step, also after dimming.
// A 3 x 3 grid (the demo's) does much better: > 15 normal, > 6 dichromat, > 10 half full.
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

    // Colour of trait index = x_level * y_levels + y_level (the order of TraitGrid), as
    // drawn for a full patch.
    Rgb8 colour(int trait) const { return colours_[static_cast<std::size_t>(trait)]; }
    Rgb8 colour(int x_level, int y_level) const { return colour(x_level * y_levels_ + y_level); }
    const std::vector<Rgb8>& colours() const { return colours_; }

    // The colour at a position of the continuous design space: sx = dormancy, sy =
    // transfer, each in [0, 1].
    static Rgb8 at(double sx, double sy);
    // The CIELAB target before gamut fitting, for tests and documentation.
    static Lab design_lab(double sx, double sy);

private:
    int x_levels_;
    int y_levels_;
    std::vector<Rgb8> colours_;
};

}  // namespace tessera
