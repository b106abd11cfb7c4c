// The live plot: the lattice-wide exponent log(1 + N) / log K of every trait against
// t / ln K, one line per trait in its palette colour.
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <vector>

#include "render/sim_worker.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"

namespace tessera {

// Draws into the rectangle (x, y, w, h) of `image`; `until_logK` fixes the right end of the
// time axis so lines do not rescale as they grow.
void draw_trait_plot(sf::Image& image, Typeface& font, int x, int y, int w, int h,
                     const std::vector<TraitHistoryPoint>& history, double until_logK, const TraitPalette& palette);

}  // namespace tessera
