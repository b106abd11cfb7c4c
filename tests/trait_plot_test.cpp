// The viewer's live plot (render/trait_plot.*): the K -> infinity limit dashed in each
// trait's colour when given, nothing dashed when not, the current time marked; and the
// normalised exponent's capacity-weighted patches (render/exponent_scale.*).
#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>

#include <cmath>
#include <cstdlib>
#include <vector>

#include "core/exponent_scale.hpp"
#include "render/trait_palette.hpp"
#include "render/trait_plot.hpp"
#include "render/typeface.hpp"

using namespace tessera;

namespace {

// A drawn line's centre pixels keep its colour to within rounding (no antialiasing here).
constexpr int colour_tolerance = 10;

bool near(sf::Color c, Rgb8 want) {
    return std::abs(c.r - want.r) <= colour_tolerance && std::abs(c.g - want.g) <= colour_tolerance &&
           std::abs(c.b - want.b) <= colour_tolerance;
}

bool colour_anywhere(const sf::Image& im, Rgb8 want) {
    for (unsigned y = 0; y < im.getSize().y; ++y)
        for (unsigned x = 0; x < im.getSize().x; ++x)
            if (near(im.getPixel(x, y), want)) return true;
    return false;
}

}  // namespace

TEST_CASE("capacity-weighted patches: walls count 0, half-capacity patches a half") {
    Scenario sc;
    Habitat wall;
    wall.capacity = 0.0;
    Habitat half;
    half.capacity = 0.5;
    sc.habitats = {Habitat{}, wall, half};
    sc.habitat_of_patch = {0, 0, 1, 2, 2};
    CHECK(capacity_weighted_patches(sc) == 3.0);
    CHECK(capacity_weighted_patches(sc, 2) == 1.0);
    // A trait at carrying capacity everywhere is at 1 (K = 100: 300 cells on 3 patches).
    CHECK(normalised_exponent(300.0, 3.0, 100.0) == Approx(std::log(101.0) / std::log(100.0)));
}

TEST_CASE("the live plot draws a given limit dashed in the trait's colour and marks the current time") {
    const TraitPalette palette(2, 2);
    LimitPrediction lp;
    lp.knot_t_logK = {0.0, 5.0, 10.0};
    lp.knot_exponents = {{0.5, 0, 0, 0}, {0.5, 0, 0, 0}, {0.5, 0, 0, 0}};
    lp.stopped_at = 10.0;
    const std::vector<TraitHistoryPoint> history = {{0.0, {0, 0, 0, 0}}, {4.0, {0, 0, 0, 0}}};
    Typeface font;
    auto draw = [&](const LimitPrediction* limit) {
        sf::Image im;
        im.create(600, 220, sf::Color::Black);
        TraitPlotInputs in;
        in.history = &history;
        in.until_logK = 10.0;
        in.limit = limit;
        draw_trait_plot(im, font, 0, 0, 600, 220, in, palette);
        return im;
    };
    const Rgb8 c0 = palette.colour(0);
    // With the limit: the row holding trait 0's colour switches between dash and gap many
    // times (a dash is 6 px on, 4 px off over ~550 px).
    const sf::Image with = draw(&lp);
    int best_row_switches = 0;
    for (unsigned y = 0; y < with.getSize().y; ++y) {
        int switches = 0;
        bool prev = false;
        for (unsigned x = 0; x < with.getSize().x; ++x) {
            const bool on = near(with.getPixel(x, y), c0);
            switches += on != prev;
            prev = on;
        }
        best_row_switches = std::max(best_row_switches, switches);
    }
    CHECK(best_row_switches > 40);
    // Without it, trait 0 (whose simulated exponent is 0, on the axis) is nowhere.
    CHECK_FALSE(colour_anywhere(draw(nullptr), c0));
    // The current time (t/lnK = 4 of 10): a dotted light column near 40 % of the width.
    const sf::Image im = draw(nullptr);
    int light_column = -1;
    for (unsigned x = 0; x < im.getSize().x && light_column < 0; ++x) {
        int light = 0;
        for (unsigned y = 0; y < im.getSize().y; ++y) light += im.getPixel(x, y).r > 150 && im.getPixel(x, y).g > 150;
        if (light > 60) light_column = static_cast<int>(x);
    }
    CHECK(light_column > 36 + (600 - 48) * 4 / 10 - 3);
    CHECK(light_column < 36 + (600 - 48) * 4 / 10 + 3);
}
