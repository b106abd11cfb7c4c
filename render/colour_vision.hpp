// How a colour looks to a reader with a red-green colour vision deficiency, so that the
// palette tests can check that trait colours stay apart for them too.
//
// Model: Machado, Oliveira & Fernandes (2009), "A physiologically-based model for
// simulation of color vision deficiency", IEEE Trans. Visualization and Computer Graphics
// 15(6):1291-1298. Their severity-1.0 matrices (dichromacy: protanopia, deuteranopia) are
// applied to linear-light sRGB, as in the paper.
#pragma once

#include "render/colour_lab.hpp"

namespace tessera {

enum class Deficiency { protanopia, deuteranopia };

LinearRgb simulate(LinearRgb c, Deficiency d);
Rgb8 simulate(Rgb8 c, Deficiency d);

}  // namespace tessera
