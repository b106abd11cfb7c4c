#include "render/figures/plplot_drawing.hpp"

#include <plstream.h>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <fstream>
#include <stdexcept>
#include <vector>

namespace tessera {

namespace {

// Colours of the page around the plots (the plot areas take the viewer's dark panel, on
// which the trait palette was designed to be read).
constexpr Rgb8 page_colour{255, 255, 255};
constexpr Rgb8 ink{28, 28, 34};
constexpr Rgb8 muted_ink{70, 72, 80};
constexpr Rgb8 dark_area{34, 36, 44};
constexpr Rgb8 dark_grid{62, 65, 78};
constexpr Rgb8 light_area{238, 238, 240};
constexpr Rgb8 dark_text{228, 228, 232};
constexpr Rgb8 dark_muted_text{170, 172, 182};
// Shaded schedule intervals: a warm tint, read as "stress on" against the dark plot area.
constexpr Rgb8 shading_colour{255, 120, 80};
constexpr double shading_opacity = 0.16;
constexpr Rgb8 marker_colour{235, 235, 240};

// The cairo drivers and PLplot's SVG driver draw at 72 units per inch.
constexpr double dots_per_mm = 72.0 / 25.4;
// PLplot's character height is that of a capital letter; our em is the line's text height.
constexpr double capital_per_em = 0.72;

// PLplot reads '#' as the start of an escape sequence; a literal one is written "##".
std::string escaped(const std::string& s) {
    std::string out;
    for (char c : s) out += c == '#' ? std::string("##") : std::string(1, c);
    return out;
}

// The decimals a tick step needs to be written exactly (0.25: 2, 5: 0), at most 6.
int decimals_of(double step) {
    for (int d = 0; d < 6; ++d) {
        const double scaled = step * std::pow(10.0, d);
        if (std::fabs(scaled - std::round(scaled)) < 1e-9 * std::max(1.0, scaled)) return d;
    }
    return 6;
}

// Every how many of `n` category labels to write along `room` pixels, each needing `need`.
std::size_t label_stride(std::size_t n, double room, double need) {
    if (n == 0 || !(room > 0)) return 1;
    const double fit = std::max(1.0, std::floor(room / need));
    return std::max<std::size_t>(1, static_cast<std::size_t>(std::ceil(static_cast<double>(n) / fit)));
}

// A round step (1, 2, 2.5 or 5 times a power of ten) giving at most `ticks` intervals over
// `range`; 0 (PLplot's own choice) when there is room for many.
double tick_step(double range, double ticks) {
    if (!(range > 0) || ticks >= 8) return 0.0;
    const double raw = range / std::max(ticks, 1.0);
    const double ten = std::pow(10.0, std::floor(std::log10(raw)));
    for (double m : {1.0, 2.0, 2.5, 5.0, 10.0})
        if (m * ten >= raw) return m * ten;
    return 10.0 * ten;
}

class Drawing {
public:
    Drawing(const Figure& f, const FigureLayout& l, plstream& pls) : f_(f), l_(l), pls_(pls) {}

    void draw() {
        for (std::size_t i = 0; i < f_.panels.size(); ++i) draw_panel(i);
        page();
        text_size(l_.label_em);
        if (!f_.title.empty()) page_text(l_.width / 2.0, l_.title_y, f_.title, l_.title_em, 0.5, ink);
        if (!f_.subtitle.empty()) page_text(l_.width / 2.0, l_.subtitle_y, f_.subtitle, l_.subtitle_em, 0.5, muted_ink);
        if (!l_.panels.empty()) {
            const double grid_left = l_.panels.front().left;
            double grid_right = 0, grid_top = l_.height, grid_bottom = 0;
            for (const auto& b : l_.panels) {
                grid_right = std::max(grid_right, b.right);
                grid_top = std::min(grid_top, b.top);
                grid_bottom = std::max(grid_bottom, b.bottom);
            }
            if (!f_.x_label.empty()) page_text((grid_left + grid_right) / 2.0, l_.x_label_y, f_.x_label, l_.label_em, 0.5, ink);
            if (!f_.y_label.empty())
                page_text(l_.y_label_x, (grid_top + grid_bottom) / 2.0, f_.y_label, l_.label_em, 0.5, ink, true);
        }
        draw_legend();
    }

private:
    void colour(Rgb8 c, double alpha = 1.0) {
        pls_.scol0a(15, c.r, c.g, c.b, alpha);
        pls_.col0(15);
    }
    void text_size(double em) { pls_.schr(em * capital_per_em / dots_per_mm, 1.0); }
    void width(double w) { pls_.width(w * l_.line_width); }
    void style(LineStyle s) {
        const double unit = 1000.0 * l_.em / dots_per_mm;  // micrometres per em
        if (s == LineStyle::solid) {
            pls_.styl(0, nullptr, nullptr);
        } else {
            PLINT mark = static_cast<PLINT>(s == LineStyle::dashed ? 0.55 * unit : 0.12 * unit);
            PLINT space = static_cast<PLINT>(s == LineStyle::dashed ? 0.35 * unit : 0.25 * unit);
            pls_.styl(1, &mark, &space);
        }
    }

    // The whole page as the window, in pixels with y upwards.
    void page() {
        pls_.vpor(0.0, 1.0, 0.0, 1.0);
        pls_.wind(0.0, l_.width, 0.0, l_.height);
    }
    // Text centred vertically on y (pixels from the top), justified by `just` (0 left, 1 right).
    void page_text(double x, double y, const std::string& s, double em, double just, Rgb8 c, bool vertical = false) {
        text_size(em);
        colour(c);
        // PLplot puts the reference point on the text's centre line.
        if (vertical) pls_.ptex(x, l_.height - y, 0.0, 1.0, just, escaped(s).c_str());
        else pls_.ptex(x, l_.height - y, 1.0, 0.0, just, escaped(s).c_str());
    }
    void page_rect(double x0, double y0, double x1, double y1) {
        PLFLT xs[4] = {x0, x1, x1, x0}, ys[4] = {l_.height - y0, l_.height - y0, l_.height - y1, l_.height - y1};
        pls_.fill(4, xs, ys);
    }
    void page_line(double x0, double y0, double x1, double y1) { pls_.join(x0, l_.height - y0, x1, l_.height - y1); }

    void rect(double x0, double x1, double y0, double y1) {
        PLFLT xs[4] = {x0, x1, x1, x0}, ys[4] = {y0, y0, y1, y1};
        pls_.fill(4, xs, ys);
    }

    // Lines with NaN gaps, one plline per unbroken stretch.
    void polyline(const std::vector<double>& x, const std::vector<double>& y) {
        std::vector<PLFLT> xs, ys;
        auto flush = [&] {
            if (xs.size() >= 2) pls_.line(static_cast<PLINT>(xs.size()), xs.data(), ys.data());
            xs.clear();
            ys.clear();
        };
        for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
            if (std::isfinite(x[i]) && std::isfinite(y[i])) {
                xs.push_back(x[i]);
                ys.push_back(y[i]);
            } else {
                flush();
            }
        }
        flush();
    }

    void draw_panel(std::size_t i) {
        const Panel& p = f_.panels[i];
        const PixelBox& b = l_.panels[i];
        pls_.vpor(b.left / l_.width, b.right / l_.width, 1.0 - b.bottom / l_.height, 1.0 - b.top / l_.height);
        pls_.wind(p.x_min, p.x_max, p.y_min, p.y_max);
        colour(p.dark ? dark_area : light_area);
        rect(p.x_min, p.x_max, p.y_min, p.y_max);
        colour(shading_colour, shading_opacity);
        for (const auto& s : p.shading) rect(std::max(s.from, p.x_min), std::min(s.to, p.x_max), p.y_min, p.y_max);
        const bool categorical = !p.x_categories.empty() || !p.y_categories.empty();
        if (!categorical) {
            width(0.7);
            style(LineStyle::solid);
            colour(p.dark ? dark_grid : Rgb8{210, 210, 214});
            pls_.box("g", 0.0, 0, p.log_y ? "gl" : "g", 0.0, 0);
        }
        for (const auto& band : p.bands) {
            colour(band.colour, band.opacity);
            std::vector<PLFLT> xs, ys;
            for (std::size_t k = 0; k < band.x.size(); ++k) {
                xs.push_back(band.x[k]);
                ys.push_back(band.low[k]);
            }
            for (std::size_t k = band.x.size(); k-- > 0;) {
                xs.push_back(band.x[k]);
                ys.push_back(band.high[k]);
            }
            if (xs.size() >= 3) pls_.fill(static_cast<PLINT>(xs.size()), xs.data(), ys.data());
        }
        for (const auto& c : p.curves) {
            colour(c.colour);
            width(c.width);
            style(c.style);
            polyline(c.x, c.y);
        }
        style(LineStyle::solid);
        for (const auto& c : p.cells) {
            colour(c.fill);
            rect(c.x0, c.x1, c.y0, c.y1);
        }
        // Cell labels where they fit. Labels are digits, commas and brackets, narrower than
        // the layout's estimate for words: 0.5 em a character (measured 0.45-0.48 at our sizes).
        // They are set a little smaller than tick labels, as labels inside a plot are.
        constexpr double cell_char_em = 0.5, cell_text_scale = 0.78;
        const double cell_em = cell_text_scale * l_.tick_em;
        text_size(cell_em);
        for (const auto& c : p.cells) {
            if (c.text.empty()) continue;
            const double cell_px = (c.x1 - c.x0) / (p.x_max - p.x_min) * b.width();
            const double cell_py = (c.y1 - c.y0) / (p.y_max - p.y_min) * b.height();
            const double w = text_width(c.text, cell_em) * cell_char_em / text_width("0", 1.0);
            if (w > cell_px - 0.15 * l_.em || 1.3 * cell_em > cell_py) continue;
            colour(c.text_colour);
            pls_.ptex((c.x0 + c.x1) / 2.0, (c.y0 + c.y1) / 2.0, 1.0, 0.0, 0.5, escaped(c.text).c_str());
        }
        if (std::isfinite(p.marker_x)) {
            colour(marker_colour);
            width(1.0);
            style(LineStyle::dotted);
            PLFLT xs[2] = {p.marker_x, p.marker_x}, ys[2] = {p.y_min, p.y_max};
            pls_.line(2, xs, ys);
            style(LineStyle::solid);
        }
        // Frame, ticks outside the plot area, tick labels.
        width(1.0);
        colour(muted_ink);
        text_size(l_.tick_em);
        if (categorical) {
            pls_.box("bc", 0.0, 0, "bc", 0.0, 0);
            // Many categories: every k-th label, k chosen so neighbours stay a little apart
            // (the widest label plus an em along x, 1.6 em of height along y).
            double widest = 0.0;
            for (const std::string& c : p.x_categories) widest = std::max(widest, text_width(c, l_.tick_em));
            const std::size_t nx = p.x_categories.size(), ny = p.y_categories.size();
            const std::size_t x_stride = label_stride(nx, b.width(), widest + l_.em);
            const std::size_t y_stride = label_stride(ny, b.height(), 1.6 * l_.tick_em);
            for (std::size_t k = 0; k < nx; k += x_stride) {
                const double pos = (static_cast<double>(k) - p.x_min) / (p.x_max - p.x_min);
                pls_.mtex("b", 1.5, pos, 0.5, escaped(p.x_categories[k]).c_str());
            }
            for (std::size_t k = 0; k < ny; k += y_stride) {
                const double pos = (static_cast<double>(k) - p.y_min) / (p.y_max - p.y_min);
                pls_.mtex("lv", 0.6, pos, 1.0, escaped(p.y_categories[k]).c_str());
            }
        } else {
            // Ticks and numbers on the bottom and left edges only, pointing out of the plot;
            // a low panel gets fewer numbers on its y axis so they stay apart.
            const double y_step = p.log_y ? 0.0 : tick_step(p.y_max - p.y_min, b.height() / (2.2 * l_.em));
            // PLplot writes the numbers of a step it is given with its own (too few) digits:
            // 0.25 came out as 0.3. As many decimals as the step needs, then automatic again.
            pls_.box("bint", 0.0, 0, "", 0.0, 0);
            if (y_step > 0) pls_.prec(1, decimals_of(y_step));
            pls_.box("", 0.0, 0, p.log_y ? "bintvl" : "bintv", y_step, 0);
            pls_.prec(0, 0);
            pls_.box("c", 0.0, 0, "c", 0.0, 0);
        }
        if (!p.title.empty()) {
            // Narrow panels (many of them) get a smaller title rather than overlapping ones.
            const double room = b.width() - 0.4 * l_.em;
            const double tw = text_width(p.title, l_.label_em);
            text_size(tw > room ? std::max(l_.label_em * room / tw, 0.6 * l_.label_em) : l_.label_em);
            colour(ink);
            pls_.mtex("t", 0.9, 0.5, 0.5, escaped(p.title).c_str());
        }
    }

    void draw_legend() {
        if (f_.legend.empty()) return;
        const bool dark = f_.panels.empty() || f_.panels.front().dark;
        const PixelBox& box = l_.legend;
        if (dark) {
            colour(dark_area);
            page_rect(box.left, box.top, box.right, box.bottom);
        }
        const double em = l_.em;
        for (std::size_t k = 0; k < f_.legend.size() && k < l_.legend_at.size(); ++k) {
            const LegendEntry& e = f_.legend[k];
            const double x = l_.legend_at[k].x, y = l_.legend_at[k].y;
            const double x0 = x + 0.2 * em, x1 = x + 2.2 * em;
            Rgb8 text = dark ? dark_text : ink;
            switch (e.kind) {
                case LegendEntry::Kind::line:
                case LegendEntry::Kind::dashed:
                case LegendEntry::Kind::dotted:
                    colour(e.colour);
                    width(e.kind == LegendEntry::Kind::line ? 2.5 : 1.8);
                    style(e.kind == LegendEntry::Kind::line ? LineStyle::solid
                          : e.kind == LegendEntry::Kind::dashed ? LineStyle::dashed : LineStyle::dotted);
                    page();
                    page_line(x0, y, x1, y);
                    style(LineStyle::solid);
                    break;
                case LegendEntry::Kind::band:
                    page();
                    colour(e.colour, 0.35);
                    page_rect(x0, y - 0.4 * em, x1, y + 0.4 * em);
                    colour(e.colour);
                    width(2.0);
                    page_line(x0, y, x1, y);
                    break;
                case LegendEntry::Kind::swatch:
                    page();
                    colour(e.colour);
                    page_rect(x0, y - 0.45 * em, x1, y + 0.45 * em);
                    break;
                case LegendEntry::Kind::shading:
                    page();
                    colour(dark_area);
                    page_rect(x0, y - 0.5 * em, x1, y + 0.5 * em);
                    colour(shading_colour, shading_opacity);
                    page_rect(x0, y - 0.5 * em, x1, y + 0.5 * em);
                    break;
                case LegendEntry::Kind::heading: break;
                case LegendEntry::Kind::note: text = dark ? dark_muted_text : muted_ink; break;
            }
            width(1.0);
            page();
            const double tx = e.kind == LegendEntry::Kind::heading || e.kind == LegendEntry::Kind::note ? x0 : x1 + 0.5 * em;
            page_text(tx, y, e.text, l_.label_em, 0.0, text);
        }
    }

    const Figure& f_;
    const FigureLayout& l_;
    plstream& pls_;
};

}  // namespace

std::optional<FigureFormat> figure_format_of(const std::string& file) {
    const std::size_t dot = file.rfind('.');
    if (dot == std::string::npos) return std::nullopt;
    std::string ext = file.substr(dot + 1);
    for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    if (ext == "png") return FigureFormat::png;
    if (ext == "svg") return FigureFormat::svg;
    if (ext == "pdf") return FigureFormat::pdf;
    return std::nullopt;
}

void draw_figure(const Figure& figure, const FigureLayout& layout, const std::string& file, FigureFormat format) {
    // PLplot ends the process when it cannot open its file; find out first, with a message.
    {
        std::ofstream probe(file, std::ios::binary | std::ios::trunc);
        if (!probe) throw std::runtime_error(file + ": cannot be written");
    }
    plstream pls;
    pls.sdev(format == FigureFormat::png ? "pngcairo" : format == FigureFormat::pdf ? "pdfcairo" : "svg");
    pls.sfnam(file.c_str());
    const std::string geometry = std::to_string(layout.width) + "x" + std::to_string(layout.height);
    pls.setopt("geometry", geometry.c_str());
    pls.scolbg(page_colour.r, page_colour.g, page_colour.b);
    pls.init();
    pls.adv(0);
    Drawing(figure, layout, pls).draw();
}

}  // namespace tessera
