// Exact pixel colours of a small known state, in the views that matter most.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <vector>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"
#include "render/legend.hpp"
#include "render/rasteriser.hpp"
#include "render/typeface.hpp"

using namespace tessera;

namespace {

// 4 x 1 lattice, 3 x 3 traits, K = 100: [empty][full of trait 5][one cell of trait 0][wall].
FieldSnapshot small_state() {
    Scenario sc;
    sc.K = 100;
    sc.width = 4;
    sc.height = 1;
    Habitat open;
    Habitat wall;
    wall.name = "wall";
    wall.capacity = 0.0;
    sc.habitats = {open, wall};
    sc.habitat_of_patch = {0, 0, 0, 1};
    FieldSnapshot s = make_snapshot(sc, 0.0);
    s.active[1 * 9 + 5] = 60;
    s.dormant[1 * 9 + 5] = 40;  // 100 cells = K: full
    s.active[1 * 9 + 2] = 10;
    s.active[2 * 9 + 0] = 1;
    return s;
}

Rgb8 pixel(const sf::Image& image, unsigned x, unsigned y) { return from_sf(image.getPixel(x, y)); }

}  // namespace

TEST_CASE("dominant-trait view: empty, full, sparse and wall patches") {
    const FieldSnapshot s = small_state();
    const TraitPalette palette(s.grid);
    const sf::Image image = rasterise(s, FieldView::dominant_trait, 4, palette);
    REQUIRE(image.getSize() == sf::Vector2u(16, 4));
    CHECK(pixel(image, 1, 1) == empty_colour);
    CHECK(empty_colour == Rgb8{18, 20, 26});
    // log(101)/log(100) > 1 is clamped: a full patch shows the pure trait colour. Trait 5
    // is (x 1, y 2): sx = 0.5, sy = 1, design L* 90, a* 28.5, b* 57 (golden yellow), fitted
    // into the gamut.
    CHECK(palette.colour(5) == Rgb8{242, 193, 90});
    CHECK(pixel(image, 5, 2) == Rgb8{242, 193, 90});
    // One cell of trait 0 (sx = sy = 0, design L* 82, a* -28.25, b* -29: sky cyan, fitted to
    // (79, 220, 255)), mixed with the empty colour by w = 0.2 + 0.8 * log(2)/log(100) =
    // 0.3204: 18 + 61 w, 20 + 200 w, 26 + 229 w, rounded.
    CHECK(palette.colour(0) == Rgb8{79, 220, 255});
    const double w = 0.2 + 0.8 * std::log(2.0) / std::log(100.0);
    CHECK(w == Approx(0.3204).margin(1e-4));
    CHECK(pixel(image, 9, 1) == Rgb8{38, 84, 99});
    CHECK(pixel(image, 9, 1) == fill_shade(palette.colour(0), std::log(2.0) / std::log(100.0)));
    // Wall: hatched along diagonals ((x + y) % 4 == 0 is a stripe).
    CHECK(pixel(image, 12, 0) == wall_stripe);
    CHECK(pixel(image, 13, 0) == wall_colour);
    CHECK(pixel(image, 15, 1) == wall_stripe);
}

TEST_CASE("one-number views use their ramps") {
    const FieldSnapshot s = small_state();
    const TraitPalette palette(s.grid);
    const sf::Image dormant = rasterise(s, FieldView::dormant_fraction, 1, palette);
    CHECK(pixel(dormant, 1, 0) == dormant_ramp(40.0 / 110.0));
    CHECK(pixel(dormant, 2, 0) == dormant_ramp(0.0));
    CHECK(pixel(dormant, 0, 0) == empty_colour);
    CHECK(pixel(dormant, 3, 0) == wall_colour);  // below 4 px per patch a wall is plain

    const sf::Image exponent = rasterise(s, FieldView::total_exponent, 1, palette);
    CHECK(pixel(exponent, 1, 0) == exponent_ramp(std::log(111.0) / std::log(100.0)));

    // Mean transfer of patch 1: trait 5 has y = 4 (100 cells), trait 2 has y = 4 (10 cells).
    const sf::Image transfer = rasterise(s, FieldView::mean_transfer, 1, palette);
    CHECK(pixel(transfer, 1, 0) == transfer_ramp(1.0));
    CHECK(pixel(transfer, 2, 0) == transfer_ramp(0.0));
}

TEST_CASE("ties go to the lowest trait index; summaries add active and dormant") {
    FieldSnapshot s = small_state();
    s.active[0 * 9 + 7] = 5;
    s.dormant[0 * 9 + 3] = 5;
    const PatchSummary p = summarise(s, 0);
    CHECK(p.total == 10);
    CHECK(p.dormant == 5);
    CHECK(p.dominant == 3);
}

TEST_CASE("the legend's brightness strip is the rasteriser's fill shading") {
    // Patches of one trait holding 9 cells (fill log 10 / log 100 = 0.5) and 100 cells
    // (fill 1) on the lattice, and the legend drawn next to them: the legend strip shows
    // exactly the colours the lattice uses at those fill levels.
    FieldSnapshot s = small_state();
    std::fill(s.active.begin(), s.active.end(), 0);
    std::fill(s.dormant.begin(), s.dormant.end(), 0);
    const TraitPalette palette(s.grid);
    const int middle = s.grid.index(1, 1);  // the legend's strip trait on a 3 x 3 grid
    s.active[0 * 9 + middle] = 9;
    s.active[1 * 9 + middle] = 100;
    const sf::Image lattice = rasterise(s, FieldView::dominant_trait, 1, palette);
    const Rgb8 half = pixel(lattice, 0, 0), full = pixel(lattice, 1, 0);
    CHECK(half == fill_shade(palette.colour(middle), 0.5));
    CHECK(full == palette.colour(middle));
    REQUIRE(legend_fill_traits(s) == std::vector<int>{middle});

    Typeface font;
    const int width = 230;
    const int height = draw_legend(nullptr, font, 0, 0, width, s, FieldView::dominant_trait, palette);
    sf::Image legend;
    legend.create(width, static_cast<unsigned>(height), to_sf(panel_colour));
    draw_legend(&legend, font, 0, 0, width, s, FieldView::dominant_trait, palette);
    auto count = [&](Rgb8 c) {
        int n = 0;
        for (unsigned y = 0; y < legend.getSize().y; ++y) {
            for (unsigned x = 0; x < legend.getSize().x; ++x) n += pixel(legend, x, y) == c;
        }
        return n;
    };
    // Each strip cell is a block of at least 16 x 16 pixels of one colour.
    for (double level : legend_fill_levels) {
        INFO("fill " << level);
        CHECK(count(fill_shade(palette.colour(middle), level)) >= 16 * 16);
    }
    CHECK(count(half) >= 16 * 16);
    CHECK(count(full) >= 2 * 16 * 16);  // the strip's right end and the grid's swatch
}

TEST_CASE("the brightness strips show the traits dominating most patches, most first") {
    FieldSnapshot s = small_state();
    // small_state: trait 5 dominates patch 1, trait 0 patch 2.
    CHECK(legend_fill_traits(s) == std::vector<int>{0, 5});  // one patch each: lower index first
    s.active[0 * 9 + 5] = 3;                                 // now trait 5 dominates two patches
    CHECK(legend_fill_traits(s) == std::vector<int>{5, 0});
    std::fill(s.active.begin(), s.active.end(), 0);
    std::fill(s.dormant.begin(), s.dormant.end(), 0);
    CHECK(legend_fill_traits(s) == std::vector<int>{s.grid.index(1, 1)});  // empty: the middle trait
}

// Habitat outlines (issue 14): a 3 x 1 lattice of classes [open][treated][open]; the treated
// patch gets a line of its class colour along both sides that face the open patches, with a
// dark line inside it at scale 6, in the views of cells only, and not with the setting off.
TEST_CASE("habitat classes other than the first are outlined in the views of cells") {
    Scenario sc;
    sc.K = 100;
    sc.width = 3;
    sc.height = 1;
    Habitat open, treated;
    treated.name = "treated";
    treated.colour = "#8fa8d8";
    sc.habitats = {open, treated};
    sc.habitat_of_patch = {0, 1, 0};
    FieldSnapshot s = make_snapshot(sc, 0.0);
    const TraitPalette palette(s.grid);
    const Rgb8 line{0x8f, 0xa8, 0xd8};
    const sf::Image image = rasterise(s, FieldView::dominant_trait, 6, palette);
    CHECK(pixel(image, 6, 3) == line);       // left side of the treated patch
    CHECK(pixel(image, 11, 3) == line);      // its right side
    CHECK(pixel(image, 7, 3) == empty_colour);  // the dark line inside
    CHECK(pixel(image, 8, 3) == empty_colour);  // the patch itself (no cells)
    CHECK(pixel(image, 5, 3) == empty_colour);  // the open patch beside it: no line
    CHECK(pixel(image, 8, 0) == empty_colour);  // the lattice edge needs none
    CHECK(pixel(rasterise(s, FieldView::dormant_fraction, 6, palette), 6, 3) == line);
    CHECK(pixel(rasterise(s, FieldView::total_exponent, 6, palette), 6, 3) == line);
    CHECK(pixel(rasterise(s, FieldView::habitat, 6, palette), 6, 3) == line);  // the class colour itself
    CHECK(pixel(rasterise(s, FieldView::stress, 6, palette), 6, 3) != line);
    CHECK(pixel(rasterise(s, FieldView::dominant_trait, 2, palette), 2, 1) == empty_colour);  // too small
    s.scenario.habitat_outlines = false;
    CHECK(pixel(rasterise(s, FieldView::dominant_trait, 6, palette), 6, 3) == empty_colour);
}

TEST_CASE("frames name every schedule and say when it is on") {
    Scenario sc;
    sc.K = 100;
    sc.time_unit = TimeUnit::plain;
    Habitat open, treated;
    treated.name = "treated";
    sc.habitats = {open, treated};
    sc.habitat_of_patch = {1};
    Schedule pulse;
    pulse.name = "antibiotic pulse";
    pulse.habitat = "treated";
    pulse.start = 2.0;
    pulse.end = 3.0;
    pulse.every = 4.0;
    pulse.stress = 5.0;
    Schedule unnamed = pulse;
    unnamed.name = "";
    unnamed.start = 10.0;
    unnamed.every = 0.0;
    unnamed.end = 11.0;
    sc.schedules = {pulse, unnamed};
    for (double t : {0.0, 1.99, 3.0, 5.5, 9.5, 11.0}) {
        const auto status = schedule_status(make_snapshot(sc, t));
        REQUIRE(status.size() == 2);
        CHECK(status[0].text() == "antibiotic pulse: off");
        CHECK_FALSE(status[1].on);
    }
    for (double t : {2.0, 2.5, 6.0, 10.0, 10.9}) {
        const auto status = schedule_status(make_snapshot(sc, t));
        CHECK(status[0].text() == "antibiotic pulse: ON");
        CHECK(status[1].text() == std::string("treated schedule: ") + (t >= 10.0 ? "ON" : "off"));
    }
}
