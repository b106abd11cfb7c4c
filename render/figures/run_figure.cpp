#include "render/figures/run_figure.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>

#include "core/trait_grid.hpp"
#include "render/trait_palette.hpp"

namespace tessera {

namespace {

// Colour of the legend's samples of line styles (dashed, dotted) and of the band: neutral,
// since every trait draws them in its own colour.
constexpr Rgb8 neutral{200, 202, 210};
// Curve widths, in the layout's line width: data, replicates, overlays.
constexpr double data_width = 2.0, replicate_width = 0.8, overlay_width = 1.6;

std::string number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

struct Axis {
    const Scenario& sc;
    TimeAxis time;
    double log_K() const { return std::log(sc.K); }
    double of(double t, double t_logK) const { return time == TimeAxis::logK ? t_logK : t; }
    double of_logK(double t_logK) const { return time == TimeAxis::logK ? t_logK : t_logK * log_K(); }
    // A time written in run.time_unit, on this axis.
    double of_unit(double v) const {
        if (sc.time_unit == TimeUnit::logK) return of_logK(v);
        return time == TimeAxis::plain ? v : v / log_K();
    }
};

// A dormant fraction is drawn only where the trait has at least this many cells: the
// fraction of one or two cells jumps between 0 and 1 and hides the traits that matter.
constexpr double dormant_fraction_min_cells = 10.0;

// The plotted value of a count row for the quantity.
double value_of(PlotQuantity what, const SeriesRow& r) {
    const double n = r.active + r.dormant;
    switch (what) {
        case PlotQuantity::counts: return std::log10(1.0 + n);
        case PlotQuantity::dormant: return n >= dormant_fraction_min_cells ? r.dormant / n : std::nan("");
        default: return r.exponent;
    }
}

// Rows of `file` of one replicate, grouped by (habitat, trait), in time order.
using Track = std::vector<const SeriesRow*>;
std::map<std::pair<int, int>, Track> tracks(const SeriesFile& file, int replicate) {
    std::map<std::pair<int, int>, Track> out;
    for (const auto& r : file.rows)
        if (r.replicate == replicate) out[{r.habitat, r.trait}].push_back(&r);
    return out;
}

Curve curve_of(const Track& track, PlotQuantity what, const Axis& axis, Rgb8 colour, LineStyle style, double width) {
    Curve c;
    c.colour = colour;
    c.style = style;
    c.width = width;
    for (const SeriesRow* r : track) {
        c.x.push_back(axis.of(r->t, r->t_logK));
        c.y.push_back(value_of(what, *r));
    }
    return c;
}

// Schedule intervals on the time axis, each repeat up to run.until, of the schedules of
// habitat class `habitat` (every schedule when empty); and a legend text.
std::vector<Shading> schedule_shading(const Scenario& sc, const Axis& axis, const std::string& habitat, std::string& legend) {
    std::vector<Shading> out;
    for (const auto& s : sc.schedules) {
        if (!habitat.empty() && s.habitat != habitat) continue;
        for (int k = 0; k < 10000; ++k) {
            const double from = s.start + k * s.every, to = s.end + k * s.every;
            if (from >= sc.until) break;
            out.push_back({axis.of_unit(from), axis.of_unit(std::min(to, sc.until))});
            if (!(s.every > 0)) break;
        }
    }
    if (sc.schedules.size() == 1) {
        const Schedule& s = sc.schedules.front();
        std::string what;
        auto add = [&](const char* name, const std::optional<double>& v) {
            if (v) what += std::string(what.empty() ? "" : ", ") + name + " " + number(*v);
        };
        add("stress", s.stress);
        add("capacity", s.capacity);
        add("resuscitation", s.resuscitation);
        add("permeability", s.permeability);
        // Its name when it has one ("antibiotic pulse: treated, stress 10").
        legend = (s.name.empty() ? "schedule on: " + s.habitat : s.name + ": " + s.habitat) +
                 (what.empty() ? "" : (s.name.empty() ? " " : ", ") + what);
    } else if (!sc.schedules.empty()) {
        legend = "one of " + std::to_string(sc.schedules.size()) + " schedules on";
    }
    return out;
}

int replicate_count(const SeriesFile& f) {
    int r = 0;
    for (const auto& row : f.rows) r = std::max(r, row.replicate + 1);
    return r;
}

}  // namespace

std::string trait_label(const Scenario& sc, int trait) {
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    return "(" + number(grid.dormancy(trait)) + ", " + number(grid.transfer(trait)) + ")";
}

bool needs_habitat_series(const RunFigureOptions& o) {
    return o.what == PlotQuantity::habitats || o.panels == PanelSplit::habitat;
}

Figure build_run_figure(const RunInputs& in, const RunFigureOptions& o) {
    const Scenario& sc = in.scenario;
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    const TraitPalette palette(grid);
    const Axis axis{sc, o.time};
    const bool by_habitat = needs_habitat_series(o);
    const PlotQuantity what = o.what == PlotQuantity::habitats ? PlotQuantity::exponents : o.what;
    const SeriesFile& counts = by_habitat ? *in.habitat_series : in.series;
    const int replicates = replicate_count(counts);
    // The ensemble describes lattice totals of exponents and counts.
    const bool ensemble = !in.ensemble.empty() && !by_habitat && what != PlotQuantity::dormant;

    // Which traits: those asked for, else every trait with cells at some time.
    std::set<int> shown(o.traits.begin(), o.traits.end());
    if (shown.empty()) {
        for (const auto& r : counts.rows)
            if (r.active + r.dormant > 0) shown.insert(r.trait);
        for (const auto& r : in.ensemble)
            if (r.present > 0) shown.insert(r.trait);
    }

    // Panels: one, one per dormancy level, or one per habitat class.
    // Walls (capacity 0) hold no cells and get no panel.
    std::vector<std::string> titles;
    std::vector<int> habitat_panel(sc.habitats.size(), -1);
    std::vector<std::string> panel_habitat;  // the habitat class of each panel ("" = all)
    auto panel_of = [&](int habitat, int trait) -> int {
        if (o.panels == PanelSplit::dormancy) return grid.x_level(trait);
        if (by_habitat && habitat >= 0) return habitat_panel[static_cast<std::size_t>(habitat)];
        return 0;
    };
    if (o.panels == PanelSplit::dormancy) {
        for (int x = 0; x < grid.x_levels(); ++x) titles.push_back("dormancy x = " + number(grid.dormancy(grid.index(x, 0))));
    } else if (by_habitat) {
        for (std::size_t h = 0; h < sc.habitats.size(); ++h) {
            if (!(sc.habitats[h].capacity > 0)) continue;
            habitat_panel[h] = static_cast<int>(titles.size());
            titles.push_back("habitat " + sc.habitats[h].name);
            panel_habitat.push_back(sc.habitats[h].name);
        }
    } else {
        titles.push_back("");
    }
    Figure f;
    f.panels.resize(titles.size());
    panel_habitat.resize(titles.size());
    for (std::size_t p = 0; p < titles.size(); ++p) f.panels[p].title = titles[p];

    // Solid lines: the ensemble's medians with bands, or the replicates' own series.
    std::string how;
    if (ensemble) {
        std::map<int, std::vector<const EnsembleRow*>> by_trait;
        for (const auto& r : in.ensemble) by_trait[r.trait].push_back(&r);
        for (auto& [trait, rows] : by_trait) {
            if (!shown.count(trait)) continue;
            Curve c;
            Band b;
            c.colour = b.colour = palette.colour(trait);
            c.width = data_width;
            for (const EnsembleRow* r : rows) {
                const double x = axis.of(r->t, r->t_logK);
                auto v = [&](double e, double n) { return what == PlotQuantity::counts ? std::log10(1.0 + n) : e; };
                c.x.push_back(x);
                c.y.push_back(v(r->median, r->count_median));
                b.x.push_back(x);
                b.low.push_back(v(r->q10, r->count_q10));
                b.high.push_back(v(r->q90, r->count_q90));
            }
            Panel& panel = f.panels[static_cast<std::size_t>(panel_of(-1, trait))];
            panel.bands.push_back(std::move(b));
            panel.curves.push_back(std::move(c));
        }
        const int n = in.ensemble.front().replicates;
        how = "median of " + std::to_string(n) + " replicates with 10-90 % band";
    }
    const int lines = ensemble ? std::min(o.replicate_lines, replicates) : std::max(1, std::min(o.replicate_lines, replicates));
    for (int rep = 0; rep < lines; ++rep) {
        for (const auto& [key, track] : tracks(counts, rep)) {
            if (!shown.count(key.second) || (by_habitat && (key.first < 0 || habitat_panel[static_cast<std::size_t>(key.first)] < 0)))
                continue;
            const bool thin = ensemble || lines > 1;
            f.panels[static_cast<std::size_t>(panel_of(key.first, key.second))].curves.push_back(
                curve_of(track, what, axis, palette.colour(key.second), LineStyle::solid, thin ? replicate_width : data_width));
        }
    }
    if (!ensemble) {
        how = replicates > 1 ? (lines > 1 ? "replicates 0-" + std::to_string(lines - 1) + " of " + std::to_string(replicates)
                                          : "replicate 0 of " + std::to_string(replicates))
                             : "one run";
    } else if (lines > 0) {
        how += ", thin lines: replicates 0-" + std::to_string(lines - 1);
    }

    // Overlays of the predictions (lattice totals only).
    const bool limit = !in.limit.empty() && what == PlotQuantity::exponents && !by_habitat;
    const bool ode = in.ode.has_value() && !by_habitat;
    if (limit) {
        std::map<int, Curve> by_trait;
        for (const auto& r : in.limit) {
            if (!shown.count(r.trait)) continue;
            Curve& c = by_trait[r.trait];
            c.colour = palette.colour(r.trait);
            c.style = LineStyle::dashed;
            c.width = overlay_width;
            c.x.push_back(axis.of_logK(r.t_logK));
            c.y.push_back(r.exponent);
        }
        for (auto& [trait, c] : by_trait) f.panels[static_cast<std::size_t>(panel_of(-1, trait))].curves.push_back(std::move(c));
    }
    if (ode) {
        for (const auto& [key, track] : tracks(*in.ode, 0)) {
            if (!shown.count(key.second)) continue;
            f.panels[static_cast<std::size_t>(panel_of(-1, key.second))].curves.push_back(
                curve_of(track, what, axis, palette.colour(key.second), LineStyle::dotted, overlay_width));
        }
    }

    // Axes: time from 0 to run.until (or the last time written, if later); y from the data.
    std::string shading_text;
    const bool shaded = !schedule_shading(sc, axis, "", shading_text).empty();
    double x_max = axis.of_unit(sc.until), y_max = 0.0;
    for (const auto& p : f.panels) {
        for (const auto& c : p.curves)
            for (std::size_t k = 0; k < c.x.size(); ++k) {
                x_max = std::max(x_max, c.x[k]);
                if (std::isfinite(c.y[k])) y_max = std::max(y_max, c.y[k]);
            }
        for (const auto& b : p.bands)
            for (double v : b.high) y_max = std::max(y_max, v);
    }
    for (std::size_t i = 0; i < f.panels.size(); ++i) {
        Panel& p = f.panels[i];
        p.x_min = 0.0;
        p.x_max = x_max > 0 ? x_max : 1.0;
        // Per habitat: only that class's schedules.
        std::string ignored;
        p.shading = schedule_shading(sc, axis, panel_habitat[i], ignored);
        if (what == PlotQuantity::dormant) {
            p.y_max = 1.0;
        } else if (what == PlotQuantity::counts) {
            p.log_y = true;
            p.y_max = std::max(1.0, std::ceil(y_max + 0.05));
        } else {
            // Room above 1 (a resident's line) and above the highest value.
            p.y_max = std::max(1.1, std::ceil((y_max + 0.05) * 10.0) / 10.0);
        }
    }

    // Words.
    const std::size_t patches = sc.habitat_of_patch.size();
    const bool one_patch = patches <= 1;
    f.title = sc.title.empty() ? "tessera run " + in.dir : sc.title;
    f.subtitle = "K = " + number(sc.K) + ", " + (one_patch ? std::string("one patch") : std::to_string(sc.width) + " x " + std::to_string(sc.height) + " patches") +
                 "; " + how;
    f.x_label = o.time == TimeAxis::logK ? "time t / ln K   (ln K = " + number(std::round(axis.log_K() * 100) / 100) + ")"
                                         : "time t (model time units)";
    const bool per_patch = by_habitat || counts.per_patch;
    switch (what) {
        case PlotQuantity::counts:
            f.y_label = by_habitat ? "1 + cells in the habitat (log scale)" : "1 + cells (log scale)";
            f.subtitle += "; cells = active + dormant";
            break;
        case PlotQuantity::dormant:
            f.y_label = "dormant fraction D / (A + D)";
            f.subtitle += "; drawn where a trait has >= " + number(dormant_fraction_min_cells) + " cells";
            break;
        default:
            f.y_label = one_patch ? "exponent log(1 + N) / ln K"
                        : per_patch ? "exponent per patch log(1 + N/P) / ln K"
                                    : "exponent log(1 + N) / ln K";
            if (!one_patch)
                f.subtitle += per_patch ? "; P = capacity-weighted patches (1 = full everywhere)" : "; N = lattice total";
    }

    f.legend.push_back({LegendEntry::Kind::heading, neutral, "trait (dormancy, transfer)"});
    for (int trait : shown) f.legend.push_back({LegendEntry::Kind::line, palette.colour(trait), trait_label(sc, trait)});
    if (ensemble) f.legend.push_back({LegendEntry::Kind::band, neutral, "median, 10-90 % of runs"});
    if (limit) f.legend.push_back({LegendEntry::Kind::dashed, neutral, "K \u2192 \u221e limit"});
    if (ode) f.legend.push_back({LegendEntry::Kind::dotted, neutral, "deterministic, this K"});
    if (shaded) f.legend.push_back({LegendEntry::Kind::shading, neutral, shading_text});
    return f;
}

}  // namespace tessera
