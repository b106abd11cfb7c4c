#include "render/trait_plot.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"

namespace tessera {

namespace {

std::string label(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

}  // namespace

void draw_trait_plot(sf::Image& image, Typeface& font, int x, int y, int w, int h,
                     const std::vector<TraitHistoryPoint>& history, double until_logK, const TraitPalette& palette) {
    fill_rect(image, x, y, w, h, to_sf(panel_colour));
    const unsigned size = 11;
    const int line = font.line_height(size);
    // The title in as many words as fit beside the axis name ("t / ln K", top right).
    const std::string axis = "t / ln K";
    const int title_room = w - 16 - font.width(axis, size) - 12;
    for (const char* title : {"Lattice-wide exponent log(1+N)/log K of each trait", "Exponent log(1+N)/log K of each trait",
                              "Exponent of each trait", "Exponents"}) {
        if (font.width(title, 12) <= title_room) {
            font.draw(image, x + 8, y + 4, title, 12, to_sf(text_colour));
            break;
        }
    }
    const int left = x + 36, top = y + 8 + line + 6, right = x + w - 12, bottom = y + h - line - 10;
    if (right - left < 20 || bottom - top < 20) return;

    double y_max = 1.0;
    for (const auto& p : history) {
        for (double e : p.exponent) y_max = std::max(y_max, e);
    }
    y_max = std::ceil(y_max * 4.0) / 4.0;
    const double x_max = std::max(until_logK, history.empty() ? 0.0 : history.back().t_logK);
    auto px = [&](double t) { return left + static_cast<int>(std::lround((right - left) * (x_max > 0 ? t / x_max : 0))); };
    auto py = [&](double e) { return bottom - static_cast<int>(std::lround((bottom - top) * e / y_max)); };

    // Grid and axes: exponent 0, 0.5, 1, ...; time in quarters of the run.
    for (double e = 0.0; e <= y_max + 1e-9; e += 0.5) {
        fill_rect(image, left, py(e), right - left, 1, to_sf(e == 1.0 ? Rgb8{90, 92, 104} : Rgb8{52, 54, 64}));
        font.draw(image, x + 6, py(e) - line / 2, label(e), size, to_sf(muted_text_colour));
    }
    // A plot too narrow for five time labels side by side gets three (halves of the run).
    auto tick = [&](int q) { return label(std::round(x_max * q / 4.0 * 100.0) / 100.0); };
    int widest = 0;
    for (int q = 0; q <= 4; ++q) widest = std::max(widest, font.width(tick(q), size));
    const int step = right - left >= 4 * (widest + 8) ? 1 : 2;
    for (int q = 0; q <= 4; q += step) {
        const std::string s = tick(q);
        font.draw(image, std::min(px(x_max * q / 4.0) - font.width(s, size) / 2, right - font.width(s, size)), bottom + 3, s,
                  size, to_sf(muted_text_colour));
    }
    font.draw(image, right - font.width(axis, size), y + 4 + 2, axis, size, to_sf(muted_text_colour));

    // One line per trait; extinct stretches (exponent 0) lie on the axis.
    for (int trait = 0; trait < palette.size(); ++trait) {
        const sf::Color c = to_sf(palette.colour(trait));
        for (std::size_t k = 1; k < history.size(); ++k) {
            const auto& a = history[k - 1];
            const auto& b = history[k];
            if (static_cast<int>(a.exponent.size()) <= trait || static_cast<int>(b.exponent.size()) <= trait) continue;
            if (a.exponent[trait] == 0.0 && b.exponent[trait] == 0.0) continue;
            draw_line(image, px(a.t_logK), py(a.exponent[trait]), px(b.t_logK), py(b.exponent[trait]), c);
            draw_line(image, px(a.t_logK), py(a.exponent[trait]) + 1, px(b.t_logK), py(b.exponent[trait]) + 1, c);
        }
    }
}

}  // namespace tessera
