// Legends: what the colours of a view mean, drawn into the side panel of a frame or the
// window. The dominant-trait legend is a small grid of swatches laid out like the trait
// grid (rows: dormancy ability, columns: transfer ability), labelled with the levels and
// with what each direction of colour means, and strips showing how brightness encodes how
// full a patch is for the traits on screen (the same fill_shade as the lattice).
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <string>
#include <vector>

#include "render/field_snapshot.hpp"
#include "render/field_view.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"

namespace tessera {

// Draws the legend of `view` with its top-left corner at (x, y), within `width` pixels, and
// returns the height it takes. With `image == nullptr` it only measures.
int draw_legend(sf::Image* image, Typeface& font, int x, int y, int width, const FieldSnapshot& s, FieldView view,
                const TraitPalette& palette);

// Every [[schedule]] with whether it is in force at the snapshot's time, for the header of a
// frame (all of them, on or off, so frames keep their size).
struct ScheduleStatus {
    std::string name;
    bool on = false;
    std::string text() const { return name + (on ? ": ON" : ": off"); }
};
std::vector<ScheduleStatus> schedule_status(const FieldSnapshot& s);

// Swatch side in the trait grid legend, exposed for tests that look for the swatches.
inline constexpr int legend_swatch = 22;

// The fill levels (log(1 + N) / log K_p) of the dominant-trait legend's brightness strips,
// left to right: 1 cell (about 0), sqrt(K_p) cells (0.5), K_p cells (1).
inline constexpr double legend_fill_levels[] = {0.0, 0.25, 0.5, 0.75, 1.0};

// The traits whose brightness strips the legend shows: those dominating most patches now,
// most first, at most max_fill_traits; the middle trait of the grid when the lattice is empty.
inline constexpr std::size_t max_fill_traits = 3;
std::vector<int> legend_fill_traits(const FieldSnapshot& s);

}  // namespace tessera
