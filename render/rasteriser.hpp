// The CPU rasteriser: a FieldSnapshot -> an sf::Image of the lattice, `scale` pixels per
// patch, for one FieldView. The window, the frame recorder and `tessera render` all use it,
// so what is recorded is what was watched.
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <cstddef>
#include <string>

#include "render/colour_lab.hpp"
#include "render/field_snapshot.hpp"
#include "render/field_view.hpp"
#include "render/trait_palette.hpp"

namespace tessera {

// What one patch holds, summed over traits.
struct PatchSummary {
    std::int64_t total = 0;    // active + dormant
    std::int64_t dormant = 0;
    int dominant = -1;         // trait with most cells (active + dormant), lowest index on ties; -1 if empty
    double mean_transfer = 0;  // transfer ability averaged over all cells
};

PatchSummary summarise(const FieldSnapshot& s, std::size_t patch);

// How full a patch is: log(1 + N) / log(K_p) with K_p = K * capacity, clamped to [0, 1].
double fill_level(const FieldSnapshot& s, std::size_t patch, std::int64_t total);

// In the dominant-trait view a patch is its trait colour mixed with the empty colour by
// this weight: any occupied patch shows (0.2), a full one shows the pure colour (1).
double fill_weight(double fill);

// The colour of a patch of fill level `fill` whose dominant trait has colour `full`: the
// one function behind both the lattice and the legend's "how full" strip, so they agree.
Rgb8 fill_shade(Rgb8 full, double fill);

bool is_wall(const FieldSnapshot& s, std::size_t patch);

// A habitat class's "#rrggbb" colour (the loader checked it; anything else is mid grey).
Rgb8 habitat_colour(const std::string& hex);

// The colour of one patch in one view (walls excluded: they are drawn as a pattern).
Rgb8 patch_colour(const FieldSnapshot& s, std::size_t patch, FieldView view, const TraitPalette& palette);

// The lattice, width*scale x height*scale pixels, top row first. Walls are wall_colour,
// hatched with wall_stripe along diagonals when scale >= 4. In the views of cells, classes
// other than the first are outlined in their colour (scale >= 3; Scenario::habitat_outlines).
sf::Image rasterise(const FieldSnapshot& s, FieldView view, int scale, const TraitPalette& palette);

}  // namespace tessera
