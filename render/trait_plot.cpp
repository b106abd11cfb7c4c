#include "render/trait_plot.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"

namespace tessera {

namespace {

// Dashes of the limit's lines, in pixels along the line.
constexpr double dash_on = 6.0, dash_off = 4.0;
// Dots of the deterministic model's lines.
constexpr double dot_on = 2.0, dot_off = 3.0;

std::string label(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

// A dashed line from (x0, y0) to (x1, y1); `phase` carries the dash pattern on across
// consecutive segments so a polyline dashes evenly.
void dashed_line(sf::Image& image, double x0, double y0, double x1, double y1, sf::Color c, double& phase,
                 double on = dash_on, double off = dash_off) {
    const double length = std::hypot(x1 - x0, y1 - y0);
    double s = 0.0;
    while (s < length) {
        const double in_period = std::fmod(phase, on + off);
        const double step = in_period < on ? on - in_period : on + off - in_period;
        const double e = std::min(length, s + step);
        if (in_period < on) {
            const double a = s / length, b = e / length;
            const int ax = static_cast<int>(std::lround(x0 + (x1 - x0) * a)), ay = static_cast<int>(std::lround(y0 + (y1 - y0) * a));
            const int bx = static_cast<int>(std::lround(x0 + (x1 - x0) * b)), by = static_cast<int>(std::lround(y0 + (y1 - y0) * b));
            draw_line(image, ax, ay, bx, by, c);
            draw_line(image, ax, ay + 1, bx, by + 1, c);
        }
        phase += e - s;
        s = e;
    }
}

}  // namespace

void draw_trait_plot(sf::Image& image, Typeface& font, int x, int y, int w, int h, const TraitPlotInputs& in,
                     const TraitPalette& palette) {
    static const std::vector<TraitHistoryPoint> none;
    const std::vector<TraitHistoryPoint>& history = in.history ? *in.history : none;
    fill_rect(image, x, y, w, h, to_sf(panel_colour));
    const unsigned size = 11;
    const int line = font.line_height(size);
    // The title in as many words as fit beside the axis name ("t / ln K", top right); it
    // says which exponent this is, and what the dashed lines are when there are any.
    const std::string axis = "t / ln K";
    const int title_room = w - 16 - font.width(axis, size) - 12;
    const std::string dashed = std::string(in.limit ? ";  dashed: limit K -> inf" : "") +
                               (in.ode ? ";  dotted: deterministic" : "");
    const std::vector<std::string> titles =
        in.one_patch ? std::vector<std::string>{"Exponent log(1+N)/log K of each trait" + dashed,
                                                "Exponent log(1+N)/log K" + dashed, "Exponent of each trait", "Exponents"}
                     : std::vector<std::string>{"Exponent per patch log(1+N/P)/log K, P = habitable patches (1 = all full)" + dashed,
                                                "Exponent per patch log(1+N/P)/log K (1 = all full)" + dashed,
                                                "Exponent per patch log(1+N/P)/log K", "Exponent per patch", "Exponents"};
    for (const std::string& title : titles) {
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
    const double x_max = std::max(in.until_logK, history.empty() ? 0.0 : history.back().t_logK);
    auto fx = [&](double t) { return left + (right - left) * (x_max > 0 ? t / x_max : 0); };
    auto fy = [&](double e) { return bottom - (bottom - top) * e / y_max; };
    auto px = [&](double t) { return static_cast<int>(std::lround(fx(t))); };
    auto py = [&](double e) { return static_cast<int>(std::lround(fy(e))); };

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

    // The limit, dashed, under the simulated lines: piecewise affine between its knots, up
    // to where it stopped.
    if (in.limit) {
        const LimitPrediction& lp = *in.limit;
        for (int trait = 0; trait < palette.size(); ++trait) {
            const sf::Color c = to_sf(palette.colour(trait));
            double phase = 0.0;
            for (std::size_t k = 1; k < lp.knot_t_logK.size(); ++k) {
                const auto& a = lp.knot_exponents[k - 1];
                const auto& b = lp.knot_exponents[k];
                if (static_cast<int>(a.size()) <= trait || static_cast<int>(b.size()) <= trait) continue;
                if (a[trait] <= 0.0 && b[trait] <= 0.0) continue;  // absent: it would lie on the axis
                const double t0 = std::min(lp.knot_t_logK[k - 1], x_max), t1 = std::min(lp.knot_t_logK[k], x_max);
                if (t1 <= t0) continue;
                // The value at t1 on the segment (the axis may end inside it).
                const double e1 = a[trait] + (b[trait] - a[trait]) * (t1 - lp.knot_t_logK[k - 1]) /
                                                 (lp.knot_t_logK[k] - lp.knot_t_logK[k - 1]);
                dashed_line(image, fx(t0), fy(a[trait]), fx(t1), fy(e1), c, phase);
            }
        }
    }

    // The deterministic model at this K, dotted, also under the simulated lines.
    if (in.ode) {
        const std::vector<TraitHistoryPoint>& ode = *in.ode;
        for (int trait = 0; trait < palette.size(); ++trait) {
            const sf::Color c = to_sf(palette.colour(trait));
            double phase = 0.0;
            for (std::size_t k = 1; k < ode.size() && ode[k].t_logK <= x_max; ++k) {
                const auto& a = ode[k - 1].exponent;
                const auto& b = ode[k].exponent;
                if (static_cast<int>(a.size()) <= trait || static_cast<int>(b.size()) <= trait) continue;
                if (a[trait] <= 0.0 && b[trait] <= 0.0) continue;
                dashed_line(image, fx(ode[k - 1].t_logK), fy(a[trait]), fx(ode[k].t_logK), fy(b[trait]), c, phase, dot_on,
                            dot_off);
            }
        }
    }

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

    // The current time: a thin light line over the plot, so it reads as "now".
    if (!history.empty()) {
        const int now = std::clamp(px(history.back().t_logK), left, right);
        for (int j = top; j <= bottom; j += 2) blend_pixel(image, now, j, to_sf(text_colour), 0.7);
    }
}

}  // namespace tessera
