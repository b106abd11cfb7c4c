// The live plot: the normalised exponent log(1 + N / P) / log K of every trait against
// t / ln K (N the trait's cells on the lattice, P the capacity-weighted number of habitable
// patches, so 1 = at carrying capacity everywhere; on one patch the usual log(1 + N) / log K),
// one line per trait in its palette colour; the current time marked; when the K -> infinity
// limit applies to the scenario, its prediction dashed in the same colours; and, when asked
// for, the deterministic model at this K dotted.
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <vector>

#include "render/sim_worker.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"
#include "theory/exponent_limit.hpp"

namespace tessera {

struct TraitPlotInputs {
    const std::vector<TraitHistoryPoint>* history = nullptr;
    double until_logK = 0.0;                  // fixes the right end of the time axis
    const LimitPrediction* limit = nullptr;   // null: the limit does not apply (nothing dashed)
    // The deterministic model in counts at this K (tessera view --predict ode), dotted; null: none.
    const std::vector<TraitHistoryPoint>* ode = nullptr;
    bool one_patch = true;                    // words of the title: per patch or not
};

// Draws into the rectangle (x, y, w, h) of `image`.
void draw_trait_plot(sf::Image& image, Typeface& font, int x, int y, int w, int h, const TraitPlotInputs& in,
                     const TraitPalette& palette);

}  // namespace tessera
