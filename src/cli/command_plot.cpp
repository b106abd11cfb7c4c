// tessera plot RUN_DIR|SWEEP_DIR [--out FILE] [--what ...] [--time ...] [--traits ...]
// [--size WxH] [--replicate-lines N] [--panels dormancy|habitat]: a figure of a run (exponent
// curves, ensemble bands, predictions) or the regime map of a sweep, as PNG, SVG or PDF by
// the file's extension. Needs no display.
#include <filesystem>
#include <iostream>
#include <optional>
#include <stdexcept>

#include "cli/render_commands.hpp"
#include "core/trait_grid.hpp"
#include "render/figures/figure_layout.hpp"
#include "render/figures/plplot_drawing.hpp"
#include "render/figures/regime_figure.hpp"
#include "render/figures/run_figure.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

// The smallest and largest pages the layout is designed for (text follows the page size).
constexpr int min_side = 200, max_side = 8000;

std::optional<PlotQuantity> quantity_of(const std::string& s) {
    if (s == "exponents") return PlotQuantity::exponents;
    if (s == "counts") return PlotQuantity::counts;
    if (s == "habitats") return PlotQuantity::habitats;
    if (s == "dormant") return PlotQuantity::dormant;
    return std::nullopt;
}

bool parse_size(const std::string& s, int& w, int& h) {
    const std::size_t x = s.find('x');
    if (x == std::string::npos) return false;
    try {
        std::size_t used = 0;
        w = std::stoi(s.substr(0, x), &used);
        if (used != x) return false;
        h = std::stoi(s.substr(x + 1), &used);
        if (used != s.size() - x - 1) return false;
    } catch (const std::exception&) {
        return false;
    }
    return w >= min_side && h >= min_side && w <= max_side && h <= max_side;
}

// "x:y,x:y" into trait indices; throws std::invalid_argument with the message.
std::vector<int> parse_traits(const std::string& list, const Scenario& sc) {
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    std::vector<int> out;
    std::size_t start = 0;
    while (start <= list.size()) {
        const std::size_t end = std::min(list.find(',', start), list.size());
        const std::string one = list.substr(start, end - start);
        const std::size_t colon = one.find(':');
        std::optional<int> trait;
        try {
            if (colon != std::string::npos) trait = grid.find(std::stod(one.substr(0, colon)), std::stod(one.substr(colon + 1)));
        } catch (const std::exception&) {
        }
        if (!trait)
            throw std::invalid_argument("--traits " + list + ": \"" + one +
                                        "\" is not a trait of the run; expected dormancy:transfer on the grid, e.g. 0:0,2:4");
        out.push_back(*trait);
        start = end + 1;
    }
    return out;
}

}  // namespace

int plot_command(const PlotOptions& o) {
    int w = 0, h = 0;
    if (!parse_size(o.size, w, h)) {
        std::cerr << "error: --size " << o.size << ": expected WIDTHxHEIGHT in pixels, each from " << min_side << " to "
                  << max_side << ", e.g. 1200x750\n";
        return 2;
    }
    const auto what = quantity_of(o.what);
    if (!what) {
        std::cerr << "error: --what " << o.what << ": unknown; accepted: exponents, counts, habitats, dormant\n";
        return 2;
    }
    if (o.time != "logK" && o.time != "plain") {
        std::cerr << "error: --time " << o.time << ": unknown; accepted: logK (t / ln K) or plain (t)\n";
        return 2;
    }
    if (!o.panels.empty() && o.panels != "dormancy" && o.panels != "habitat") {
        std::cerr << "error: --panels " << o.panels << ": unknown; accepted: dormancy or habitat\n";
        return 2;
    }
    const bool sweep = looks_like_sweep_directory(o.dir);
    if (!sweep && !fs::is_directory(o.dir)) {
        std::cerr << "error: " << o.dir << ": not a directory; expected the output directory of 'tessera run' or 'tessera sweep'\n";
        return 2;
    }
    if (!sweep && !looks_like_run_directory(o.dir)) {
        std::cerr << "error: " << (fs::path(o.dir) / "series.csv").string()
                  << ": not found, and no points.csv + outcomes.csv either; expected the output directory of "
                     "'tessera run' or 'tessera sweep'\n";
        return 2;
    }
    const std::string out = !o.out.empty() ? o.out : (fs::path(o.dir) / (sweep ? "regimes.png" : o.what + ".png")).string();
    const auto format = figure_format_of(out);
    if (!format) {
        std::cerr << "error: --out " << out << ": unknown figure format; the file name must end in .png, .svg or .pdf\n";
        return 2;
    }
    try {
        Figure figure;
        if (sweep) {
            figure = build_regime_figure(read_sweep_inputs(o.dir));
        } else {
            RunFigureOptions ro;
            ro.what = *what;
            ro.time = o.time == "plain" ? TimeAxis::plain : TimeAxis::logK;
            ro.replicate_lines = o.replicate_lines;
            ro.panels = o.panels == "dormancy" ? PanelSplit::dormancy : o.panels == "habitat" ? PanelSplit::habitat : PanelSplit::none;
            const RunInputs inputs = read_run_inputs(o.dir, needs_habitat_series(ro));
            if (!o.traits.empty()) ro.traits = parse_traits(o.traits, inputs.scenario);
            figure = build_run_figure(inputs, ro);
        }
        draw_figure(figure, lay_out(figure, w, h), out, *format);
    } catch (const FigureInputError& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    } catch (const std::invalid_argument& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    } catch (const std::runtime_error& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    }
    if (!o.quiet) std::cout << "wrote " << out << "\n";
    return 0;
}

}  // namespace tessera::cli
