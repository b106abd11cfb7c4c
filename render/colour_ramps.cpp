#include "render/colour_ramps.hpp"

#include <algorithm>
#include <cmath>
#include <span>

#include "render/trait_palette.hpp"

namespace tessera {

namespace {

// Piecewise-linear interpolation in CIELAB between evenly spaced stops.
Rgb8 through(std::span<const Lab> stops, double s) {
    s = std::clamp(std::isfinite(s) ? s : 0.0, 0.0, 1.0);
    const double pos = s * static_cast<double>(stops.size() - 1);
    const std::size_t i = std::min(static_cast<std::size_t>(pos), stops.size() - 2);
    const double f = pos - static_cast<double>(i);
    const Lab& a = stops[i];
    const Lab& b = stops[i + 1];
    return to_rgb8(linear_from_lab({a.L + (b.L - a.L) * f, a.a + (b.a - a.a) * f, a.b + (b.b - a.b) * f}));
}

constexpr Lab dormant_stops[] = {{22, 6, -28}, {58, 4, -42}, {94, -4, -8}};
constexpr Lab exponent_stops[] = {{20, 28, -38}, {48, 52, 8}, {72, 30, 66}, {96, -6, 60}};
constexpr Lab stress_stops[] = {{30, 0, 0}, {46, 52, 30}, {62, 72, 52}};

}  // namespace

Rgb8 dormant_ramp(double s) { return through(dormant_stops, s); }
Rgb8 exponent_ramp(double s) { return through(exponent_stops, s); }
Rgb8 stress_ramp(double s) { return through(stress_stops, s); }
Rgb8 transfer_ramp(double s) { return TraitPalette::at(0.5, std::clamp(std::isfinite(s) ? s : 0.0, 0.0, 1.0)); }

}  // namespace tessera
