#include "render/figures/regime_palette.hpp"

#include <algorithm>

namespace tessera {

const std::vector<std::string>& regime_names() {
    static const std::vector<std::string> names = {"extinct", "resident", "coexistence", "cycling"};
    return names;
}

std::optional<Rgb8> regime_colour(const std::string& regime) {
    if (regime == "extinct") return Rgb8{110, 110, 116};
    if (regime == "resident") return Rgb8{40, 100, 190};
    if (regime == "coexistence") return Rgb8{250, 185, 40};
    if (regime == "cycling") return Rgb8{200, 70, 60};
    return std::nullopt;
}

Rgb8 regime_shade(Rgb8 colour, double agree) {
    const double s = regime_pale + (1.0 - regime_pale) * std::clamp(agree, 0.0, 1.0);
    const LinearRgb c = to_linear(colour);
    return to_rgb8({1.0 + (c.r - 1.0) * s, 1.0 + (c.g - 1.0) * s, 1.0 + (c.b - 1.0) * s});
}

}  // namespace tessera
