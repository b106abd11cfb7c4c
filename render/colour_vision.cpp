#include "render/colour_vision.hpp"

#include <algorithm>

namespace tessera {

namespace {

using Matrix = double[3][3];

// Machado et al. 2009, Table "severity 1.0" (each row sums to 1, so greys stay grey).
constexpr Matrix protanopia = {{0.152286, 1.052583, -0.204868},
                               {0.114503, 0.786281, 0.099216},
                               {-0.003882, -0.048116, 1.051998}};
constexpr Matrix deuteranopia = {{0.367322, 0.860646, -0.227968},
                                 {0.280085, 0.672501, 0.047413},
                                 {-0.011820, 0.042940, 0.968881}};

}  // namespace

LinearRgb simulate(LinearRgb c, Deficiency d) {
    const Matrix& m = d == Deficiency::protanopia ? protanopia : deuteranopia;
    auto row = [&](int i) { return std::clamp(m[i][0] * c.r + m[i][1] * c.g + m[i][2] * c.b, 0.0, 1.0); };
    return {row(0), row(1), row(2)};
}

Rgb8 simulate(Rgb8 c, Deficiency d) { return to_rgb8(simulate(to_linear(c), d)); }

}  // namespace tessera
