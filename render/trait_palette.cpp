#include "render/trait_palette.hpp"

#include <stdexcept>

namespace tessera {

namespace {

// The affine design (see the header): value = base + per_x * sx + per_y * sy.
constexpr double L_base = 82.0, L_per_x = -19.0, L_per_y = 8.0;
constexpr double a_base = -22.0, a_per_x = 67.0, a_per_y = -5.0, a_twist = -25.0;
constexpr double b_base = -29.0, b_per_x = -38.0, b_per_y = 105.0;

// Scales the chroma down (same L*, same hue) until the colour is inside the sRGB gamut.
Lab fit_gamut(Lab c) {
    if (in_gamut(linear_from_lab(c))) return c;
    double lo = 0.0, hi = 1.0;
    for (int i = 0; i < 40; ++i) {
        const double mid = 0.5 * (lo + hi);
        (in_gamut(linear_from_lab({c.L, c.a * mid, c.b * mid})) ? lo : hi) = mid;
    }
    return {c.L, c.a * lo, c.b * lo};
}

// Position of a level on its axis; a single level sits in the middle of the range.
double position(int level, int levels) { return levels > 1 ? static_cast<double>(level) / (levels - 1) : 0.5; }

}  // namespace

Lab TraitPalette::design_lab(double sx, double sy) {
    return {L_base + L_per_x * sx + L_per_y * sy,
            a_base + a_per_x * sx + a_per_y * sy + a_twist * (sx - 0.5) * (sy - 0.5),
            b_base + b_per_x * sx + b_per_y * sy};
}

Rgb8 TraitPalette::at(double sx, double sy) { return to_rgb8(linear_from_lab(fit_gamut(design_lab(sx, sy)))); }

TraitPalette::TraitPalette(int x_levels, int y_levels) : x_levels_(x_levels), y_levels_(y_levels) {
    if (x_levels < 1 || y_levels < 1) throw std::invalid_argument("TraitPalette: each axis needs at least one level");
    colours_.reserve(static_cast<std::size_t>(x_levels) * y_levels);
    for (int x = 0; x < x_levels; ++x) {
        for (int y = 0; y < y_levels; ++y) colours_.push_back(at(position(x, x_levels), position(y, y_levels)));
    }
}

}  // namespace tessera
