#include "render/figures/figure_layout.hpp"

#include <algorithm>
#include <cmath>

namespace tessera {

namespace {

// The em of an 800 x 500 page, and how far it may follow the page up or down.
constexpr double base_em = 13.0;
constexpr double min_scale = 0.6, max_scale = 4.0;
// Width of one character in em, on the generous side (see the header).
constexpr double char_em = 0.56;

// Panels read best a little wider than tall; the column count whose panels come closest.
constexpr double panel_aspect = 1.5;

int column_count(std::size_t panels, double room_w, double room_h, double gap_x, double gap_y) {
    int best = 1;
    double best_score = 1e300;
    for (int c = 1; c <= static_cast<int>(panels); ++c) {
        const int r = static_cast<int>((panels + c - 1) / c);
        const double w = (room_w - (c - 1) * gap_x) / c, h = (room_h - (r - 1) * gap_y) / r;
        if (w <= 0 || h <= 0) continue;
        const double score = std::abs(std::log(w / h / panel_aspect));
        if (score < best_score) {
            best_score = score;
            best = c;
        }
    }
    return best;
}

// Widest tick label of a panel's y axis, in characters.
double y_tick_chars(const Panel& p) {
    double chars = p.log_y ? 5.0 : 4.0;
    for (const auto& c : p.y_categories) chars = std::max(chars, static_cast<double>(c.size()));
    return chars;
}

std::size_t utf8_length(const std::string& s) {
    std::size_t n = 0;
    for (unsigned char c : s) n += (c & 0xC0) != 0x80;
    return n;
}

}  // namespace

double text_width(const std::string& text, double em) { return static_cast<double>(utf8_length(text)) * char_em * em; }

double FigureLayout::pixel_x(const Figure& f, std::size_t p, double x) const {
    const Panel& panel = f.panels[p];
    const PixelBox& b = panels[p];
    return b.left + (x - panel.x_min) / (panel.x_max - panel.x_min) * b.width();
}

double FigureLayout::pixel_y(const Figure& f, std::size_t p, double y) const {
    const Panel& panel = f.panels[p];
    const PixelBox& b = panels[p];
    return b.bottom - (y - panel.y_min) / (panel.y_max - panel.y_min) * b.height();
}

FigureLayout lay_out(const Figure& figure, int width, int height) {
    FigureLayout l;
    l.width = width;
    l.height = height;
    const double W = width, H = height;
    const double scale = std::clamp(std::min(W / 800.0, H / 500.0), min_scale, max_scale);
    const double em = base_em * scale;
    l.em = em;
    l.line_width = scale;
    l.tick_em = 0.95 * em;
    l.label_em = em;

    // Title and subtitle, shrunk (down to 70 %) when the page is too narrow for them.
    auto fitted = [&](const std::string& s, double size) {
        const double room = W - 2.0 * em;
        const double w = text_width(s, size);
        return w > room ? std::max(size * room / w, 0.7 * size) : size;
    };
    double top = 0.7 * em;
    if (!figure.title.empty()) {
        l.title_em = fitted(figure.title, 1.25 * em);
        l.title_y = top + 0.8 * l.title_em;
        top += 1.7 * l.title_em;
    }
    if (!figure.subtitle.empty()) {
        l.subtitle_em = fitted(figure.subtitle, 0.9 * em);
        l.subtitle_y = top + 0.7 * l.subtitle_em;
        top += 1.6 * l.subtitle_em;
    }
    top += 0.6 * em;

    bool panel_titles = false;
    double tick_chars = 3.0;
    for (const auto& p : figure.panels) {
        panel_titles = panel_titles || !p.title.empty();
        tick_chars = std::max(tick_chars, y_tick_chars(p));
    }
    const double panel_title_h = panel_titles ? 1.5 * em : 0.0;
    const double y_ticks_w = text_width(std::string(static_cast<std::size_t>(tick_chars), '0'), l.tick_em) + 0.6 * em;
    const double x_ticks_h = 1.9 * l.tick_em;

    const double left = 0.6 * em + (figure.y_label.empty() ? 0.0 : 1.6 * em) + y_ticks_w;
    const double bottom = H - 0.6 * em - (figure.x_label.empty() ? 0.0 : 1.6 * em) - x_ticks_h;
    l.y_label_x = 0.6 * em + 0.7 * em;
    l.x_label_y = H - 0.6 * em - 0.8 * em;

    // Legend at the right, in as many columns as its rows need within the plot's height.
    double right = W - 0.8 * em;
    l.legend_row = 1.45 * em;
    if (!figure.legend.empty()) {
        // Entries that name one item (a trait's line, a regime's swatch) go in columns;
        // the others (headings, notes, line styles, shading) each take a whole row above
        // or below them, so a long one does not widen every column.
        auto in_columns = [](const LegendEntry& e) {
            return e.kind == LegendEntry::Kind::line || e.kind == LegendEntry::Kind::swatch;
        };
        const double sample_w = 2.6 * em, inner = 0.4 * em;
        double item_w = 0.0, wide_w = 0.0;
        std::size_t items = 0, wide = 0;
        for (const auto& e : figure.legend) {
            const bool heading = e.kind == LegendEntry::Kind::heading || e.kind == LegendEntry::Kind::note;
            const double w = (heading ? 0.2 * em : sample_w) + text_width(e.text, l.label_em) + 0.6 * em;
            if (in_columns(e)) {
                item_w = std::max(item_w, w);
                ++items;
            } else {
                wide_w = std::max(wide_w, w);
                ++wide;
            }
        }
        const double room = bottom - top - panel_title_h - 0.8 * em;
        const int room_rows = std::max(1, static_cast<int>(std::floor(room / l.legend_row)));
        const int item_rows = std::max(1, room_rows - static_cast<int>(wide));
        l.legend_columns = items == 0 ? 1 : static_cast<int>((items + item_rows - 1) / item_rows);
        const std::size_t per_column = items == 0 ? 1 : (items + l.legend_columns - 1) / l.legend_columns;
        const double width_needed = std::max(l.legend_columns * item_w, wide_w) + inner;
        l.legend.right = right;
        l.legend.left = right - width_needed;
        l.legend.top = top + panel_title_h;
        // Positions, in the entries' order: a run of column entries fills its columns
        // before the next whole-row entry.
        double y = l.legend.top + inner + 0.5 * l.legend_row;
        std::size_t k = 0;
        while (k < figure.legend.size()) {
            if (!in_columns(figure.legend[k])) {
                l.legend_at.push_back({l.legend.left + inner, y});
                y += l.legend_row;
                ++k;
                continue;
            }
            std::size_t run = 0;
            while (k + run < figure.legend.size() && in_columns(figure.legend[k + run])) ++run;
            const std::size_t rows_here = std::min(per_column, run);
            for (std::size_t i = 0; i < run; ++i)
                l.legend_at.push_back({l.legend.left + inner + static_cast<double>(i / rows_here) * item_w,
                                       y + static_cast<double>(i % rows_here) * l.legend_row});
            y += static_cast<double>(rows_here) * l.legend_row;
            k += run;
        }
        l.legend.bottom = y - 0.5 * l.legend_row + inner + 0.2 * em;
        right = l.legend.left - 1.2 * em;
    }

    // The grid of panels.
    const std::size_t n = std::max<std::size_t>(figure.panels.size(), 1);
    const double gap_x = y_ticks_w + 0.8 * em;
    const double gap_y = x_ticks_h + 0.6 * em + panel_title_h;
    l.columns = column_count(n, right - left, bottom - top - panel_title_h, gap_x, gap_y);
    l.rows = static_cast<int>((n + l.columns - 1) / l.columns);
    const double cell_w = (right - left - (l.columns - 1) * gap_x) / l.columns;
    const double cell_h = (bottom - top - l.rows * panel_title_h - (l.rows - 1) * (gap_y - panel_title_h)) / l.rows;
    for (std::size_t i = 0; i < figure.panels.size(); ++i) {
        const int c = static_cast<int>(i) % l.columns, r = static_cast<int>(i) / l.columns;
        PixelBox b;
        b.left = left + c * (cell_w + gap_x);
        b.right = b.left + cell_w;
        b.top = top + panel_title_h + r * (cell_h + gap_y);
        b.bottom = b.top + cell_h;
        // Whole pixels, so a line at the edge is one sharp pixel wide.
        b.left = std::round(b.left);
        b.right = std::round(b.right);
        b.top = std::round(b.top);
        b.bottom = std::round(b.bottom);
        l.panels.push_back(b);
    }
    return l;
}

}  // namespace tessera
