#include "render/legend.hpp"

#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "core/habitat_timeline.hpp"
#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"
#include "render/rasteriser.hpp"

namespace tessera {

namespace {

constexpr unsigned title_size = 15;
constexpr unsigned text_size = 12;
constexpr unsigned small_size = 11;

std::string number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

// A pen that moves down the legend; with no image it only measures.
struct Pen {
    sf::Image* image;
    Typeface& font;
    int x, y, width;

    void text(const std::string& s, unsigned size, Rgb8 colour, int dx = 0) {
        if (image) font.draw(*image, x + dx, y, s, size, to_sf(colour));
    }
    void line(const std::string& s, unsigned size = text_size, Rgb8 colour = text_colour) {
        text(s, size, colour);
        y += font.line_height(size) + 2;
    }
    void rect(int dx, int dy, int w, int h, Rgb8 colour) {
        if (image) fill_rect(*image, x + dx, y + dy, w, h, to_sf(colour));
    }
    void frame(int dx, int dy, int w, int h, Rgb8 colour) {
        if (image) outline_rect(*image, x + dx, y + dy, w, h, to_sf(colour));
    }
    void wall_swatch(int dx, int dy, int side) {
        rect(dx, dy, side, side, wall_colour);
        if (!image) return;
        for (int j = 0; j < side; ++j) {
            for (int i = 0; i < side; ++i) {
                if ((i + j) % 4 == 0) image->setPixel(static_cast<unsigned>(x + dx + i), static_cast<unsigned>(y + dy + j), to_sf(wall_stripe));
            }
        }
    }
    // A swatch of `colour` drawn as an outline around an empty patch: how the lattice marks
    // habitat classes in the views of cells.
    void outlined(Rgb8 colour, const std::string& label) {
        const int side = 14;
        rect(0, 1, side, side, empty_colour);
        frame(0, 1, side, side, colour);
        frame(1, 2, side - 2, side - 2, colour);
        text(label, text_size, text_colour, side + 8);
        y += std::max(side + 2, font.line_height(text_size)) + 3;
    }
    // A swatch followed by a label on the same line.
    void keyed(Rgb8 colour, const std::string& label, bool wall = false) {
        const int side = 14;
        if (wall) wall_swatch(0, 1, side);
        else rect(0, 1, side, side, colour);
        frame(0, 1, side, side, muted_text_colour);
        text(label, text_size, text_colour, side + 8);
        y += std::max(side + 2, font.line_height(text_size)) + 3;
    }
};

// A horizontal colour bar with labels under its ends and middle.
void colour_bar(Pen& pen, Rgb8 (*ramp)(double), const std::string& lo, const std::string& mid, const std::string& hi) {
    const int w = pen.width - 8, h = 16;
    for (int i = 0; i < w; ++i) pen.rect(i, 0, 1, h, ramp(static_cast<double>(i) / (w - 1)));
    pen.frame(0, 0, w, h, muted_text_colour);
    pen.y += h + 3;
    pen.text(lo, small_size, muted_text_colour);
    if (!mid.empty()) pen.text(mid, small_size, muted_text_colour, w / 2 - pen.font.width(mid, small_size) / 2);
    pen.text(hi, small_size, muted_text_colour, w - pen.font.width(hi, small_size));
    pen.y += pen.font.line_height(small_size) + 6;
}

// "(2, 4)": a trait by its dormancy and transfer abilities, as in the patch inspector.
std::string trait_name(const TraitGrid& g, int trait) {
    return "(" + number(g.dormancy(trait)) + ", " + number(g.transfer(trait)) + ")";
}

void trait_grid(Pen& pen, const FieldSnapshot& s, const TraitPalette& palette) {
    const TraitGrid& g = s.grid;
    // Say what each direction of colour means, in the words a newcomer would use.
    pen.line("colour: the trait with most cells", small_size, muted_text_colour);
    pen.line("\u2192 transfer ability: blue \u2192 yellow", small_size, muted_text_colour);
    pen.line("\u2193 dormancy ability: cyan \u2192 violet, pink", small_size, muted_text_colour);
    pen.y += 2;
    // Row labels take the width of the widest dormancy value.
    int label_w = 0;
    for (int x = 0; x < g.x_levels(); ++x) label_w = std::max(label_w, pen.font.width(number(g.dormancy(g.index(x, 0))), small_size));
    const int left = label_w + 6;
    const int side = std::min(legend_swatch, (pen.width - left - 8) / std::max(g.y_levels(), 1) - 2);
    const int step = side + 2;
    for (int y = 0; y < g.y_levels(); ++y) {
        const std::string v = number(g.transfer(g.index(0, y)));
        pen.text(v, small_size, muted_text_colour, left + y * step + (side - pen.font.width(v, small_size)) / 2);
    }
    pen.y += pen.font.line_height(small_size) + 1;
    for (int x = 0; x < g.x_levels(); ++x) {
        const std::string v = number(g.dormancy(g.index(x, 0)));
        pen.text(v, small_size, muted_text_colour, left - 6 - pen.font.width(v, small_size));
        for (int y = 0; y < g.y_levels(); ++y) pen.rect(left + y * step, 0, side, side, palette.colour(x, y));
        pen.y += step;
    }
    pen.y += 8;
    // How fullness shows: the traits that dominate most patches now (up to three), each
    // at the fill levels of legend_fill_levels, drawn with the rasteriser's own
    // fill_shade, so a dim patch can be matched to its trait (dim yellow turns olive, dim
    // orange brown).
    pen.line("brightness: how full the patch is,", small_size, muted_text_colour);
    pen.line("log(1+N) / log K_p, N = all its cells", small_size, muted_text_colour);
    const std::vector<int> shown = legend_fill_traits(s);
    int name_w = 0;
    for (int t : shown) name_w = std::max(name_w, pen.font.width(trait_name(g, t), small_size));
    const int strip_x = name_w + 6;
    const int strip = static_cast<int>(std::size(legend_fill_levels));
    const int w = std::min(36, (pen.width - strip_x - 8) / strip);
    for (int t : shown) {
        pen.text(trait_name(g, t), small_size, muted_text_colour, 0);
        for (int i = 0; i < strip; ++i) pen.rect(strip_x + i * w, 0, w, 16, fill_shade(palette.colour(t), legend_fill_levels[i]));
        pen.y += 18;
    }
    pen.y += 1;
    const std::string mid = "\u221aK_p", hi = "K_p cells";
    pen.text("1 cell", small_size, muted_text_colour, strip_x);
    pen.text(mid, small_size, muted_text_colour, strip_x + strip * w / 2 - pen.font.width(mid, small_size) / 2);
    pen.text(hi, small_size, muted_text_colour, strip_x + strip * w - pen.font.width(hi, small_size));
    pen.y += pen.font.line_height(small_size) + 6;
    // Room for the strips not shown now, so every frame of a run has the same size (a
    // sequence of frames becomes a video only if it does).
    const std::size_t most = std::min<std::size_t>(max_fill_traits, static_cast<std::size_t>(s.traits()));
    if (shown.size() < most) pen.y += 18 * static_cast<int>(most - shown.size());
}

void habitat_list(Pen& pen, const FieldSnapshot& s) {
    for (std::size_t c = 0; c < s.scenario.habitats.size(); ++c) {
        const Habitat& h = s.scenario.habitats[c];
        const PatchConditions& now = s.conditions[c];
        pen.keyed(habitat_colour(h.colour), h.name, now.capacity <= 0);
        pen.line("   capacity " + number(now.capacity) + ", stress " + number(now.stress), small_size, muted_text_colour);
    }
}

// The classes outlined on the lattice (every habitable class but the first), each with its
// conditions now, so a pulse shows as a change of its line. Always the same lines, so frames
// keep their size.
void outlined_habitats(Pen& pen, const FieldSnapshot& s) {
    bool any = false;
    for (std::size_t c = 1; c < s.scenario.habitats.size(); ++c) {
        const Habitat& h = s.scenario.habitats[c];
        if (h.capacity <= 0) continue;  // walls are hatched, not outlined
        if (!any) {
            pen.y += 4;
            pen.line("habitats (outlined on the lattice)", small_size, muted_text_colour);
            any = true;
        }
        const PatchConditions& now = s.conditions[c];
        pen.outlined(habitat_colour(h.colour), h.name);
        std::string what = "   capacity " + number(now.capacity) + ", stress " + number(now.stress);
        if (now.resuscitation != 1.0) what += ", resusc. x" + number(now.resuscitation);
        pen.line(what, small_size, muted_text_colour);
    }
}

}  // namespace

std::vector<ScheduleStatus> schedule_status(const FieldSnapshot& s) {
    std::vector<ScheduleStatus> out;
    const HabitatTimeline timeline(s.scenario);
    for (std::size_t i = 0; i < s.scenario.schedules.size(); ++i) {
        out.push_back({s.scenario.schedule_name(i), timeline.on(i, s.t)});
    }
    return out;
}

std::vector<int> legend_fill_traits(const FieldSnapshot& s) {
    // Count the patches each trait dominates; the top three, most patches first, ties to
    // the lower index (stable order).
    std::vector<std::int64_t> patches(static_cast<std::size_t>(s.traits()), 0);
    for (std::size_t p = 0; p < static_cast<std::size_t>(s.width) * static_cast<std::size_t>(s.height); ++p) {
        const int d = summarise(s, p).dominant;
        if (d >= 0) ++patches[static_cast<std::size_t>(d)];
    }
    std::vector<int> order(patches.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = static_cast<int>(i);
    std::stable_sort(order.begin(), order.end(), [&](int a, int b) { return patches[static_cast<std::size_t>(a)] > patches[static_cast<std::size_t>(b)]; });
    std::vector<int> shown;
    for (int t : order) {
        if (patches[static_cast<std::size_t>(t)] == 0 || shown.size() == max_fill_traits) break;
        shown.push_back(t);
    }
    if (shown.empty()) shown.push_back(s.grid.index(s.grid.x_levels() / 2, s.grid.y_levels() / 2));
    return shown;
}

int draw_legend(sf::Image* image, Typeface& font, int x, int y, int width, const FieldSnapshot& s, FieldView view,
                const TraitPalette& palette) {
    Pen pen{image, font, x, y, width};
    pen.line(std::string(view_title(view)), title_size);
    pen.y += 2;
    switch (view) {
        case FieldView::dominant_trait: trait_grid(pen, s, palette); break;
        case FieldView::dormant_fraction:
            pen.line("dormant cells / all cells", small_size, muted_text_colour);
            colour_bar(pen, dormant_ramp, "0 (all active)", "", "1");
            break;
        case FieldView::mean_transfer:
            pen.line("mean transfer ability y of all cells", small_size, muted_text_colour);
            colour_bar(pen, transfer_ramp, "0", number(s.grid.transfer_max() / 2), number(s.grid.transfer_max()));
            break;
        case FieldView::total_exponent:
            pen.line("log(1+N) / log K, N = all cells", small_size, muted_text_colour);
            colour_bar(pen, exponent_ramp, "0 (1 cell)", "0.5", "1 (K cells)");
            break;
        case FieldView::habitat: habitat_list(pen, s); break;
        case FieldView::stress:
            pen.line("extra death rate of active cells", small_size, muted_text_colour);
            colour_bar(pen, stress_ramp, "0", "", number(s.stress_scale()) + " per unit time");
            break;
    }
    if (view != FieldView::habitat && view != FieldView::stress) pen.keyed(empty_colour, "no cells");
    // The habitat list already shows wall habitats hatched; elsewhere say what hatching means.
    const bool listed_wall = view == FieldView::habitat &&
                             std::any_of(s.conditions.begin(), s.conditions.end(), [](const PatchConditions& c) { return c.capacity <= 0; });
    if (!listed_wall) pen.keyed(wall_colour, "wall (capacity 0)", true);
    if (s.scenario.habitat_outlines && view != FieldView::habitat && view != FieldView::stress) {
        outlined_habitats(pen, s);
    }
    return pen.y - y;
}

}  // namespace tessera
