#include "render/patch_inspector.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"

namespace tessera {

namespace {

std::string count(std::int64_t n) {
    char buf[32];
    if (n < 100000) std::snprintf(buf, sizeof buf, "%lld", static_cast<long long>(n));
    else std::snprintf(buf, sizeof buf, "%.2e", static_cast<double>(n));
    return buf;
}

}  // namespace

void draw_patch_inspector(sf::Image& image, Typeface& font, int x, int y, int w, int h, const FieldSnapshot& s,
                          std::size_t patch, const TraitPalette& palette) {
    fill_rect(image, x, y, w, h, to_sf(panel_colour));
    const int col = static_cast<int>(patch % static_cast<std::size_t>(s.width));
    const int row = static_cast<int>(patch / static_cast<std::size_t>(s.width));
    const Habitat& hab = s.scenario.habitats[s.scenario.habitat_of_patch[patch]];
    const PatchConditions& c = s.conditions_of(patch);
    char head[160];
    std::snprintf(head, sizeof head, "Patch (%d, %d): %s, K_p = %.3g", col, row, hab.name.c_str(), s.scenario.K * c.capacity);
    font.draw(image, x + 8, y + 4, head, 12, to_sf(text_colour));
    const int T = s.traits();
    const int top = y + 24;
    // Two bars per trait row: active (solid) over dormant (lighter); rows shrink to fit.
    const int row_h = std::clamp((h - 40) / std::max(T, 1), 6, 22);
    const unsigned size = row_h >= 14 ? 11u : 9u;
    const int label_w = 70, number_w = 150;
    const int bar_x = x + 8 + label_w, bar_w = std::max(w - label_w - number_w - 20, 10);
    font.draw(image, bar_x, top - 2, "active (solid) / dormant (pale), exponent", 10, to_sf(muted_text_colour));
    const double Kp = s.scenario.K * c.capacity;
    const double lnKp = Kp > 1.0 ? std::log(Kp) : 1.0;
    const std::int64_t* A = s.active_at(patch);
    const std::int64_t* D = s.dormant_at(patch);
    for (int i = 0; i < T; ++i) {
        const int ry = top + 14 + i * row_h;
        if (ry + row_h > y + h) break;
        char name[48];
        std::snprintf(name, sizeof name, "(%g, %g)", s.grid.dormancy(i), s.grid.transfer(i));
        fill_rect(image, x + 8, ry + 1, 8, row_h - 2, to_sf(palette.colour(i)));
        font.draw(image, x + 20, ry + (row_h - font.line_height(size)) / 2, name, size, to_sf(muted_text_colour));
        const double ea = std::clamp(std::log1p(static_cast<double>(A[i])) / lnKp, 0.0, 1.0);
        const double ed = std::clamp(std::log1p(static_cast<double>(D[i])) / lnKp, 0.0, 1.0);
        const int half = std::max((row_h - 2) / 2, 1);
        fill_rect(image, bar_x, ry + 1, bar_w, 2 * half, to_sf(Rgb8{44, 46, 56}));
        fill_rect(image, bar_x, ry + 1, static_cast<int>(bar_w * ea), half, to_sf(palette.colour(i)));
        fill_rect(image, bar_x, ry + 1 + half, static_cast<int>(bar_w * ed), half,
                  mix(to_sf(palette.colour(i)), sf::Color::White, 0.55));
        char numbers[96];
        std::snprintf(numbers, sizeof numbers, "%s / %s  (%.2f / %.2f)", count(A[i]).c_str(), count(D[i]).c_str(), ea, ed);
        font.draw(image, bar_x + bar_w + 8, ry + (row_h - font.line_height(size)) / 2, numbers, size, to_sf(text_colour));
    }
}

}  // namespace tessera
