#include "render/rasteriser.hpp"

#include <algorithm>
#include <cmath>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"

namespace tessera {

namespace {

Rgb8 mix(Rgb8 under, Rgb8 over, double a) { return from_sf(tessera::mix(to_sf(under), to_sf(over), a)); }

}  // namespace

Rgb8 habitat_colour(const std::string& hex) {
    // "#rrggbb"; the loader validates it, anything else draws mid grey.
    if (hex.size() != 7 || hex[0] != '#') return {128, 128, 128};
    auto byte = [&](int at) { return static_cast<std::uint8_t>(std::stoi(hex.substr(static_cast<std::size_t>(at), 2), nullptr, 16)); };
    try {
        return {byte(1), byte(3), byte(5)};
    } catch (...) {
        return {128, 128, 128};
    }
}

namespace {

// Habitat outlines (Scenario::habitat_outlines): in the views of cells a patch's class is not
// visible, so every patch of a class other than the first (the background) gets a line of its
// class colour along each side that faces a habitable patch of another class, with a dark
// line inside it at scales of 6 and more so it reads over bright and dark patches alike.
// Walls are hatched already and the lattice edge needs no line. Below scale 3 a line would
// cover most of a patch, so there are none.
void draw_outlines(sf::Image& image, const FieldSnapshot& s, int scale) {
    if (scale < 3) return;
    const auto& cls = s.scenario.habitat_of_patch;
    const sf::Color dark = to_sf(empty_colour);
    for (int row = 0; row < s.height; ++row) {
        for (int col = 0; col < s.width; ++col) {
            const std::size_t p = static_cast<std::size_t>(row) * s.width + col;
            if (cls[p] == 0 || is_wall(s, p)) continue;
            const sf::Color line = to_sf(habitat_colour(s.scenario.habitats[cls[p]].colour));
            const int x = col * scale, y = row * scale;
            const int dc[4] = {-1, 1, 0, 0}, dr[4] = {0, 0, -1, 1};
            for (int side = 0; side < 4; ++side) {
                const int c = col + dc[side], r = row + dr[side];
                if (c < 0 || r < 0 || c >= s.width || r >= s.height) continue;
                const std::size_t q = static_cast<std::size_t>(r) * s.width + c;
                if (cls[q] == cls[p] || is_wall(s, q)) continue;
                for (int depth = 0; depth < (scale >= 6 ? 2 : 1); ++depth) {
                    const sf::Color colour = depth == 0 ? line : dark;
                    for (int i = 0; i < scale; ++i) {
                        // Sides: left/right run down the patch, top/bottom across it.
                        const int px = side == 0 ? x + depth : side == 1 ? x + scale - 1 - depth : x + i;
                        const int py = side == 2 ? y + depth : side == 3 ? y + scale - 1 - depth : y + i;
                        if (depth == 1 && (i == 0 || i == scale - 1)) continue;  // keep the corners in colour
                        image.setPixel(static_cast<unsigned>(px), static_cast<unsigned>(py), colour);
                    }
                }
            }
        }
    }
}

}  // namespace

PatchSummary summarise(const FieldSnapshot& s, std::size_t patch) {
    PatchSummary out;
    const std::int64_t* a = s.active_at(patch);
    const std::int64_t* d = s.dormant_at(patch);
    std::int64_t best = 0;
    double transfer_sum = 0.0;
    for (int i = 0; i < s.traits(); ++i) {
        const std::int64_t n = a[i] + d[i];
        out.total += n;
        out.dormant += d[i];
        transfer_sum += static_cast<double>(n) * s.grid.transfer(i);
        if (n > best) {
            best = n;
            out.dominant = i;
        }
    }
    if (out.total > 0) out.mean_transfer = transfer_sum / static_cast<double>(out.total);
    return out;
}

double fill_level(const FieldSnapshot& s, std::size_t patch, std::int64_t total) {
    if (total <= 0) return 0.0;
    const double Kp = s.scenario.K * s.conditions_of(patch).capacity;
    if (Kp <= 1.0) return 1.0;
    return std::clamp(std::log1p(static_cast<double>(total)) / std::log(Kp), 0.0, 1.0);
}

double fill_weight(double fill) { return 0.2 + 0.8 * std::clamp(fill, 0.0, 1.0); }

Rgb8 fill_shade(Rgb8 full, double fill) { return mix(empty_colour, full, fill_weight(fill)); }

bool is_wall(const FieldSnapshot& s, std::size_t patch) { return s.conditions_of(patch).capacity <= 0.0; }

Rgb8 patch_colour(const FieldSnapshot& s, std::size_t patch, FieldView view, const TraitPalette& palette) {
    const PatchConditions& c = s.conditions_of(patch);
    switch (view) {
        case FieldView::habitat:
            return habitat_colour(s.scenario.habitats[s.scenario.habitat_of_patch[patch]].colour);
        case FieldView::stress: {
            const double top = s.stress_scale();
            return stress_ramp(top > 0 ? c.stress / top : 0.0);
        }
        default: break;
    }
    const PatchSummary p = summarise(s, patch);
    if (p.total == 0) return empty_colour;
    switch (view) {
        case FieldView::dominant_trait:
            return fill_shade(palette.colour(p.dominant), fill_level(s, patch, p.total));
        case FieldView::dormant_fraction:
            return dormant_ramp(static_cast<double>(p.dormant) / static_cast<double>(p.total));
        case FieldView::mean_transfer: {
            const double top = s.grid.transfer_max();
            return transfer_ramp(top > 0 ? p.mean_transfer / top : 0.0);
        }
        case FieldView::total_exponent:
            return exponent_ramp(std::log1p(static_cast<double>(p.total)) / std::log(s.scenario.K));
        default: return empty_colour;
    }
}

sf::Image rasterise(const FieldSnapshot& s, FieldView view, int scale, const TraitPalette& palette) {
    scale = std::max(scale, 1);
    sf::Image image;
    image.create(static_cast<unsigned>(s.width * scale), static_cast<unsigned>(s.height * scale), to_sf(empty_colour));
    for (int row = 0; row < s.height; ++row) {
        for (int col = 0; col < s.width; ++col) {
            const std::size_t p = static_cast<std::size_t>(row) * s.width + col;
            const int x = col * scale, y = row * scale;
            if (!is_wall(s, p)) {
                fill_rect(image, x, y, scale, scale, to_sf(patch_colour(s, p, view, palette)));
                continue;
            }
            // Walls: hatched, in lattice coordinates so stripes run on across neighbouring walls.
            for (int j = 0; j < scale; ++j) {
                for (int i = 0; i < scale; ++i) {
                    const bool stripe = scale >= 4 && (x + i + y + j) % 4 == 0;
                    image.setPixel(static_cast<unsigned>(x + i), static_cast<unsigned>(y + j),
                                   to_sf(stripe ? wall_stripe : wall_colour));
                }
            }
        }
    }
    if (s.scenario.habitat_outlines && view != FieldView::habitat && view != FieldView::stress) {
        draw_outlines(image, s, scale);
    }
    return image;
}

}  // namespace tessera
