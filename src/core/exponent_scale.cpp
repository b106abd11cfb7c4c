#include "core/exponent_scale.hpp"

#include <cmath>

namespace tessera {

double capacity_weighted_patches(const Scenario& scenario, int habitat_class) {
    double p = 0.0;
    for (const auto c : scenario.habitat_of_patch) {
        if (habitat_class >= 0 && c != habitat_class) continue;
        if (c < scenario.habitats.size()) p += scenario.habitats[c].capacity;
    }
    // A scenario without a map (never after loading) has one patch of the default class.
    if (scenario.habitat_of_patch.empty() && habitat_class <= 0 && !scenario.habitats.empty())
        p = scenario.habitats.front().capacity * scenario.width * scenario.height;
    return p;
}

double normalised_exponent(double cells, double patches, double K) {
    if (!(patches > 0.0)) return 0.0;
    return std::log1p(cells / patches) / std::log(K);
}

}  // namespace tessera
