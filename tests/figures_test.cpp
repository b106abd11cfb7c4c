// tessera plot's figures (render/figures/): golden-free checks that fail on real breakage.
// The inputs are constructed here in the formats of docs/formats.md; the expected positions
// come from the layout code (figure_layout.hpp), never from the picture.
#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>
#include <boost/property_tree/ptree.hpp>
#include <boost/property_tree/xml_parser.hpp>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <map>
#include <tuple>
#include <set>
#include <sys/wait.h>
#include <sstream>
#include <string>

#include "io/csv_table.hpp"
#include "io/scenario_writer.hpp"
#include "render/colour_vision.hpp"
#include "render/figures/figure_layout.hpp"
#include "render/figures/plplot_drawing.hpp"
#include "render/figures/regime_figure.hpp"
#include "render/figures/regime_palette.hpp"
#include "render/figures/run_figure.hpp"
#include "render/trait_palette.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

// Antialiasing blends a line's edges with what lies under it; its centre pixels keep the
// colour to within rounding. A pixel "has" a colour when every channel is this close.
constexpr int colour_tolerance = 10;
// The task's bound on where a data point may land (pixels).
constexpr double position_tolerance = 2.0;

fs::path fresh_dir(const std::string& name) {
    const fs::path dir = fs::temp_directory_path() / ("tessera_figures_" + name);
    fs::remove_all(dir);
    fs::create_directories(dir);
    return dir;
}

void write(const fs::path& file, const std::string& text) { std::ofstream(file) << text; }

// A 2 x 2 trait grid ((0,0), (0,4), (4,0), (4,4)) on one patch at K = 100, until t/lnK = 10,
// with a schedule on from 2 to 3.
Scenario fixture_scenario() {
    Scenario sc;
    sc.title = "constructed figure test";
    sc.K = 100;
    sc.dormancy_axis = {4.0, 2};
    sc.transfer_axis = {4.0, 2};
    sc.habitats = {Habitat{}};
    sc.habitat_of_patch = {0};
    Schedule s;
    s.habitat = "open";
    s.start = 2.0;
    s.end = 3.0;
    s.stress = 1.0;
    sc.schedules = {s};
    sc.until = 10.0;
    return sc;
}

// A run directory whose trait (0,0) sits at exponent 0.5 up to t/lnK = 5 and at 0.8 after;
// trait (0,4) rises linearly from 0 to 1; (4,4) stays at 0.2; (4,0) never has cells.
fs::path fixture_run(const std::string& name) {
    const fs::path dir = fresh_dir(name);
    const Scenario sc = fixture_scenario();
    write(dir / "scenario.resolved.toml", resolved_scenario_toml(sc));
    std::ostringstream s;
    s << "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent,exponent_per_patch\n";
    const double lnK = std::log(sc.K);
    const double times[] = {0, 1, 2, 3, 4, 5, 5.000001, 6, 7, 8, 9, 10};
    for (double tl : times) {
        auto row = [&](int x, int y, double e) {
            const double n = std::expm1(e * lnK);
            s << 0 << ',' << tl * lnK << ',' << tl << ',' << x << ',' << y << ',' << n << ",0," << e << ',' << e << '\n';
        };
        row(0, 0, tl <= 5 ? 0.5 : 0.8);
        row(0, 4, tl / 10.0);
        row(4, 0, 0.0);
        row(4, 4, 0.2);
    }
    write(dir / "series.csv", s.str());
    return dir;
}

bool near(sf::Color c, Rgb8 want) {
    return std::abs(c.r - want.r) <= colour_tolerance && std::abs(c.g - want.g) <= colour_tolerance &&
           std::abs(c.b - want.b) <= colour_tolerance;
}

// Whether any pixel within `radius` of (x, y) has the colour.
bool colour_near(const sf::Image& im, double x, double y, Rgb8 want, double radius) {
    for (int dy = -static_cast<int>(radius); dy <= static_cast<int>(radius); ++dy)
        for (int dx = -static_cast<int>(radius); dx <= static_cast<int>(radius); ++dx) {
            const int px = static_cast<int>(std::lround(x)) + dx, py = static_cast<int>(std::lround(y)) + dy;
            if (px >= 0 && py >= 0 && px < static_cast<int>(im.getSize().x) && py < static_cast<int>(im.getSize().y) &&
                near(im.getPixel(px, py), want))
                return true;
        }
    return false;
}

bool colour_anywhere(const sf::Image& im, Rgb8 want) {
    for (unsigned y = 0; y < im.getSize().y; ++y)
        for (unsigned x = 0; x < im.getSize().x; ++x)
            if (near(im.getPixel(x, y), want)) return true;
    return false;
}

std::string hex(Rgb8 c) {
    char buf[8];
    std::snprintf(buf, sizeof buf, "#%02X%02X%02X", c.r, c.g, c.b);
    return buf;
}

// Runs the built program; returns its exit code and puts its stderr into `err`.
int run_tessera(const std::string& args, std::string& err) {
    const fs::path err_file = fs::temp_directory_path() / "tessera_figures_stderr.txt";
    const std::string cmd = "'" + std::string(TESSERA_BINARY) + "' " + args + " >/dev/null 2>'" + err_file.string() + "'";
    const int status = std::system(cmd.c_str());
    std::ifstream in(err_file);
    std::ostringstream text;
    text << in.rdbuf();
    err = text.str();
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace

TEST_CASE("a run figure PNG has the asked size, is not blank and shows every legend colour") {
    const fs::path dir = fixture_run("png");
    const RunInputs in = read_run_inputs(dir.string(), false);
    const Figure f = build_run_figure(in, {});
    const TraitPalette palette(2, 2);
    // The legend lists the traits with cells, in the palette's colours; (4,0) never had any.
    std::set<std::string> listed;
    for (const auto& e : f.legend)
        if (e.kind == LegendEntry::Kind::line) listed.insert(e.text);
    CHECK(listed == std::set<std::string>{"(0, 0)", "(0, 4)", "(4, 4)"});
    for (const auto& [w, h] : {std::pair{800, 500}, std::pair{1600, 1000}}) {
        const fs::path file = dir / ("f" + std::to_string(w) + ".png");
        draw_figure(f, lay_out(f, w, h), file.string(), FigureFormat::png);
        sf::Image im;
        REQUIRE(im.loadFromFile(file.string()));
        CHECK(im.getSize() == sf::Vector2u(static_cast<unsigned>(w), static_cast<unsigned>(h)));
        std::set<std::uint32_t> colours;
        for (unsigned y = 0; y < im.getSize().y; y += 3)
            for (unsigned x = 0; x < im.getSize().x; x += 3) colours.insert(im.getPixel(x, y).toInteger());
        CHECK(colours.size() > 50);
        for (const auto& e : f.legend) {
            if (e.kind != LegendEntry::Kind::line) continue;
            INFO(w << "x" << h << " trait " << e.text);
            CHECK(colour_anywhere(im, e.colour));
        }
        // The trait without cells is nowhere (its colour would mean a line drawn for it).
        CHECK_FALSE(colour_anywhere(im, palette.colour(1, 0)));
    }
}

TEST_CASE("a constructed series lands at the pixels the layout computes, at both sizes") {
    const fs::path dir = fixture_run("pixels");
    const Figure f = build_run_figure(read_run_inputs(dir.string(), false), {});
    REQUIRE(f.panels.size() == 1);
    CHECK(f.panels[0].x_min == 0.0);
    CHECK(f.panels[0].x_max == 10.0);  // run.until
    const Rgb8 c00 = TraitPalette(2, 2).colour(0, 0);
    for (const auto& [w, h] : {std::pair{800, 500}, std::pair{1600, 1000}}) {
        const FigureLayout l = lay_out(f, w, h);
        const fs::path file = dir / ("p" + std::to_string(w) + ".png");
        draw_figure(f, l, file.string(), FigureFormat::png);
        sf::Image im;
        REQUIRE(im.loadFromFile(file.string()));
        INFO(w << "x" << h);
        // On the flat stretches, and on the step at t/lnK = 5 (a vertical segment).
        CHECK(colour_near(im, l.pixel_x(f, 0, 2.5), l.pixel_y(f, 0, 0.5), c00, position_tolerance));
        CHECK(colour_near(im, l.pixel_x(f, 0, 7.5), l.pixel_y(f, 0, 0.8), c00, position_tolerance));
        CHECK(colour_near(im, l.pixel_x(f, 0, 5.0), l.pixel_y(f, 0, 0.65), c00, position_tolerance));
        // And not where it is not: 0.1 below the flat stretch (several pixels at any size).
        CHECK_FALSE(colour_near(im, l.pixel_x(f, 0, 2.5), l.pixel_y(f, 0, 0.4), c00, position_tolerance));
        // The plot box lies inside the page with room for the labels.
        CHECK(l.panels[0].left > 3 * l.em);
        CHECK(l.panels[0].bottom < h - 2 * l.em);
        CHECK(l.legend.right <= w);
    }
}

TEST_CASE("the SVG is well-formed XML with the axis labels as text and one path per trait") {
    const fs::path dir = fixture_run("svg");
    const Figure f = build_run_figure(read_run_inputs(dir.string(), false), {});
    const fs::path file = dir / "f.svg";
    draw_figure(f, lay_out(f, 800, 500), file.string(), FigureFormat::svg);
    boost::property_tree::ptree tree;
    REQUIRE_NOTHROW(boost::property_tree::read_xml(file.string(), tree));
    REQUIRE(tree.count("svg") == 1);
    std::set<std::string> texts;
    std::map<std::string, int> data_paths;  // stroke colour -> polylines with more than 2 points
    std::function<void(const boost::property_tree::ptree&)> walk = [&](const boost::property_tree::ptree& node) {
        for (const auto& [name, child] : node) {
            if (name == "text") {
                std::string s;
                for (const auto& [n, span] : child)
                    if (n == "tspan") s += span.get_value<std::string>();
                texts.insert(s);
            }
            if (name == "polyline") {
                const std::string points = child.get<std::string>("<xmlattr>.points", "");
                std::istringstream in(points);
                int n = 0;
                for (std::string p; in >> p;) ++n;
                if (n > 2) ++data_paths[child.get<std::string>("<xmlattr>.stroke", "")];
            }
            walk(child);
        }
    };
    walk(tree);
    CHECK(texts.count(f.x_label) == 1);
    CHECK(texts.count(f.y_label) == 1);
    CHECK(texts.count(f.title) == 1);
    const TraitPalette palette(2, 2);
    for (int trait : {0, 1, 3}) {
        INFO("trait " << trait);
        CHECK(data_paths[hex(palette.colour(trait))] == 1);
    }
    CHECK(data_paths.count(hex(palette.colour(2))) == 0);
}

TEST_CASE("the PDF opens: it starts with %PDF and pdfinfo reads one page of the asked size") {
    const fs::path dir = fixture_run("pdf");
    const Figure f = build_run_figure(read_run_inputs(dir.string(), false), {});
    const fs::path file = dir / "f.pdf";
    draw_figure(f, lay_out(f, 800, 500), file.string(), FigureFormat::pdf);
    std::ifstream in(file, std::ios::binary);
    char head[5] = {};
    in.read(head, 4);
    CHECK(std::string(head) == "%PDF");
    const fs::path info = dir / "info.txt";
    REQUIRE(std::system(("pdfinfo '" + file.string() + "' > '" + info.string() + "' 2>&1").c_str()) == 0);
    std::ifstream is(info);
    std::ostringstream text;
    text << is.rdbuf();
    // "Pages:   1", "Page size:   800 x 500 pts" (pdfinfo pads the values to one column).
    auto value = [&](const std::string& key) {
        const std::size_t at = text.str().find(key);
        if (at == std::string::npos) return std::string();
        const std::size_t start = text.str().find_first_not_of(' ', at + key.size());
        return text.str().substr(start, text.str().find('\n', start) - start);
    };
    CHECK(value("Pages:") == "1");
    CHECK(value("Page size:") == "800 x 500 pts");
}

TEST_CASE("an ensemble draws a band per trait and the limit and ODE files add dashed and dotted lines") {
    const fs::path dir = fixture_run("overlays");
    std::ostringstream e;
    e << "t,t_logK,dormancy,transfer,replicates,present,exponent_mean,exponent_median,exponent_q10,exponent_q90,"
         "exponent_per_patch_mean,exponent_per_patch_median,exponent_per_patch_q10,exponent_per_patch_q90,"
         "count_mean,count_median,count_q10,count_q90\n";
    for (int k = 0; k <= 10; ++k)
        e << k * std::log(100.0) << ',' << k << ",0,0,4,1,0.5,0.5,0.4,0.6,0.5,0.5,0.4,0.6,9,9,5,14\n";
    write(dir / "ensemble.csv", e.str());
    write(dir / "limit_series.csv", "t_logK,dormancy,transfer,exponent\n0,0,0,0.5\n6,0,0,0.5\n");
    write(dir / "ode_series.csv", "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent,exponent_per_patch\n"
                                  "0,0,0,0,0,9,0,0.5,0.5\n0,46.05,10,0,0,9,0,0.5,0.5\n");
    const Figure f = build_run_figure(read_run_inputs(dir.string(), false), {});
    const Panel& p = f.panels.at(0);
    CHECK(p.bands.size() == 1);
    int dashed = 0, dotted = 0;
    for (const auto& c : p.curves) {
        dashed += c.style == LineStyle::dashed;
        dotted += c.style == LineStyle::dotted;
    }
    CHECK(dashed == 1);
    CHECK(dotted == 1);
    std::set<LegendEntry::Kind> kinds;
    for (const auto& l : f.legend) kinds.insert(l.kind);
    CHECK(kinds.count(LegendEntry::Kind::band) == 1);
    CHECK(kinds.count(LegendEntry::Kind::dashed) == 1);
    CHECK(kinds.count(LegendEntry::Kind::dotted) == 1);
    CHECK(kinds.count(LegendEntry::Kind::shading) == 1);
    REQUIRE(p.shading.size() == 1);
    CHECK(p.shading[0].from == 2.0);
    CHECK(p.shading[0].to == 3.0);
}

TEST_CASE("regime colours stay apart for normal vision, both dichromacies and the paler shades") {
    // CIEDE2000 (Sharma, Wu & Dalal 2005, Color Res. Appl. 30:21); dichromacy simulated as
    // in Machado, Oliveira & Fernandes 2009 (render/colour_vision.hpp). Thresholds are our
    // design bounds with a margin below what the colours reach (23, 20, 23 full; 14.7,
    // 7.0, 11.7 at 70 %).
    const auto& names = regime_names();
    for (const auto& [agree, normal, dichromat] : {std::tuple{1.0, 20.0, 15.0}, std::tuple{0.6, 12.0, 5.0}}) {
        for (std::size_t i = 0; i < names.size(); ++i)
            for (std::size_t j = i + 1; j < names.size(); ++j) {
                const Rgb8 a = regime_shade(*regime_colour(names[i]), agree), b = regime_shade(*regime_colour(names[j]), agree);
                INFO(names[i] << " vs " << names[j] << " at " << agree);
                CHECK(delta_e2000(lab_from_rgb8(a), lab_from_rgb8(b)) > normal);
                for (Deficiency d : {Deficiency::protanopia, Deficiency::deuteranopia})
                    CHECK(delta_e2000(lab_from_rgb8(simulate(a, d)), lab_from_rgb8(simulate(b, d))) > dichromat);
            }
    }
}

TEST_CASE("a two-key sweep draws a heatmap per source with the leading regime and its shade") {
    const fs::path dir = fresh_dir("sweep");
    write(dir / "points.csv", "point,rates.transfer,scale.K\n0,0,100\n1,2,100\n2,0,1000\n3,2,1000\n");
    std::ostringstream o;
    o << "point,source,replicate,regime,residents,period,final_t_logK\n";
    for (int p = 0; p < 4; ++p) o << p << ",limit,0," << (p == 3 ? "coexistence,0:0;0:4" : "resident,0:0") << ",,20\n";
    for (int r = 0; r < 4; ++r) o << "1,run," << r << "," << (r < 3 ? "cycling,0:4" : "extinct,") << ",,20\n";
    write(dir / "outcomes.csv", o.str());
    const SweepInputs in = read_sweep_inputs(dir.string());
    const PointRegime r = leading_regime(in, 1, "run");
    CHECK(r.regime == "cycling");
    CHECK(r.agree == Approx(0.75));
    CHECK(r.residents == "0:4");
    CHECK(residents_label("0:0;0:4") == "(0,0)+(0,4)");
    const Figure f = build_regime_figure(in);
    REQUIRE(f.panels.size() == 2);  // limit and run
    CHECK(f.panels[0].cells.size() == 4);
    CHECK(f.panels[1].cells.size() == 1);
    CHECK(f.panels[1].cells[0].fill == regime_shade(*regime_colour("cycling"), 0.75));
    const fs::path file = dir / "map.png";
    draw_figure(f, lay_out(f, 800, 500), file.string(), FigureFormat::png);
    sf::Image im;
    REQUIRE(im.loadFromFile(file.string()));
    for (const char* name : {"resident", "coexistence"}) CHECK(colour_anywhere(im, *regime_colour(name)));
}

TEST_CASE("tessera plot: bad inputs exit 2 with a message naming the file") {
    std::string err;
    const fs::path empty = fresh_dir("empty_run");
    write(empty / "scenario.resolved.toml", resolved_scenario_toml(fixture_scenario()));
    CHECK(run_tessera("plot '" + empty.string() + "'", err) == 2);
    CHECK(err.find((empty / "series.csv").string()) != std::string::npos);

    const fs::path one = fresh_dir("one_point");
    write(one / "points.csv", "point,rates.transfer\n0,1\n");
    write(one / "outcomes.csv", "point,source,replicate,regime,residents,period,final_t_logK\n0,limit,0,resident,0:0,,20\n");
    CHECK(run_tessera("plot '" + one.string() + "'", err) == 2);
    CHECK(err.find((one / "points.csv").string()) != std::string::npos);
    CHECK(err.find("at least two points") != std::string::npos);

    const fs::path run = fixture_run("cli");
    CHECK(run_tessera("plot '" + run.string() + "' --what nonsense", err) == 2);
    CHECK(err.find("--what nonsense") != std::string::npos);
    CHECK(run_tessera("plot '" + run.string() + "' --out '" + (run / "f.gif").string() + "'", err) == 2);
    CHECK(err.find(".png, .svg or .pdf") != std::string::npos);
    CHECK(run_tessera("plot '" + run.string() + "' --traits 1:1", err) == 2);
    CHECK(err.find("--traits") != std::string::npos);

    // A malformed value: file, line and column.
    std::ifstream in(run / "series.csv");
    std::string header, first, rest;
    std::getline(in, header);
    std::getline(in, first);
    write(run / "series.csv", header + "\n" + first + "\n0,1,1,0,0,many,0,0.5,0.5\n");
    CHECK(run_tessera("plot '" + run.string() + "'", err) == 2);
    CHECK(err.find("series.csv:3: column active: \"many\" is not a number") != std::string::npos);

    // And a good one writes the default file.
    const fs::path good = fixture_run("cli_good");
    CHECK(run_tessera("plot '" + good.string() + "' --size 800x500", err) == 0);
    CHECK(fs::exists(good / "exponents.png"));
}
