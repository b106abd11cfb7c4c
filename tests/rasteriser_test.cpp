// Exact pixel colours of a small known state, in the views that matter most.
#include <catch2/catch.hpp>

#include <cmath>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"
#include "render/rasteriser.hpp"

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
    // log(101)/log(100) > 1 is clamped: a full patch shows the pure trait colour.
    CHECK(pixel(image, 5, 2) == palette.colour(5));
    // One cell: mixed with the empty colour by 0.2 + 0.8 * log(2)/log(100).
    const double w = 0.2 + 0.8 * std::log(2.0) / std::log(100.0);
    CHECK(pixel(image, 9, 1) == from_sf(mix(to_sf(empty_colour), to_sf(palette.colour(0)), w)));
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
