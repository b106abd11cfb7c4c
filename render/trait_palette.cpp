#include "render/trait_palette.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>

namespace tessera {

namespace {

constexpr double lightness_low = 30.0;    // x = 0
constexpr double lightness_span = 46.0;   // x = max: L = 76
constexpr double hue_start = 268.0;       // y = 0, degrees
constexpr double hue_span = -140.0;       // y = max: 128 degrees, through cyan
constexpr double hue_easing = 0.65;
constexpr double chroma_low = 90.0;       // wished-for chroma at x = 0 ...
constexpr double chroma_span = 20.0;      // ... and at x = max; the gamut usually caps it

Lab lab_at(double L, double C, double hue_deg) {
    const double h = hue_deg * std::numbers::pi / 180.0;
    return {L, C * std::cos(h), C * std::sin(h)};
}

// The largest chroma up to `wanted` that stays inside the sRGB gamut (bisection).
double fit_chroma(double L, double hue_deg, double wanted) {
    if (in_gamut(linear_from_lab(lab_at(L, wanted, hue_deg)))) return wanted;
    double lo = 0.0, hi = wanted;
    for (int i = 0; i < 40; ++i) {
        const double mid = 0.5 * (lo + hi);
        (in_gamut(linear_from_lab(lab_at(L, mid, hue_deg))) ? lo : hi) = mid;
    }
    return lo;
}

// Position of a level on its axis; a single level sits in the middle of the range.
double position(int level, int levels) { return levels > 1 ? static_cast<double>(level) / (levels - 1) : 0.5; }

}  // namespace

Rgb8 TraitPalette::at(double sx, double sy) {
    const double L = lightness_low + lightness_span * sx;
    const double hue = hue_start + hue_span * std::pow(sy, hue_easing);
    const double C = fit_chroma(L, hue, chroma_low + chroma_span * sx);
    return to_rgb8(linear_from_lab(lab_at(L, C, hue)));
}

TraitPalette::TraitPalette(int x_levels, int y_levels) : x_levels_(x_levels), y_levels_(y_levels) {
    if (x_levels < 1 || y_levels < 1) throw std::invalid_argument("TraitPalette: each axis needs at least one level");
    colours_.reserve(static_cast<std::size_t>(x_levels) * y_levels);
    for (int x = 0; x < x_levels; ++x) {
        for (int y = 0; y < y_levels; ++y) colours_.push_back(at(position(x, x_levels), position(y, y_levels)));
    }
}

}  // namespace tessera
