// The colour arithmetic the palette tests rely on, against published reference values.
#include <catch2/catch.hpp>

#include "render/colour_lab.hpp"
#include "render/colour_vision.hpp"

using namespace tessera;

TEST_CASE("sRGB white and primaries map to their CIELAB values (D65)") {
    const Lab white = lab_from_rgb8({255, 255, 255});
    CHECK(white.L == Approx(100.0).margin(1e-3));
    CHECK(white.a == Approx(0.0).margin(1e-3));
    CHECK(white.b == Approx(0.0).margin(1e-3));
    const Lab red = lab_from_rgb8({255, 0, 0});  // commonly tabulated: 53.24, 80.09, 67.20
    CHECK(red.L == Approx(53.24).margin(0.01));
    CHECK(red.a == Approx(80.09).margin(0.01));
    CHECK(red.b == Approx(67.20).margin(0.01));
}

TEST_CASE("Lab -> sRGB -> Lab round-trips") {
    for (Rgb8 c : {Rgb8{12, 200, 99}, Rgb8{250, 250, 3}, Rgb8{0, 0, 0}, Rgb8{90, 30, 220}}) {
        CHECK(to_rgb8(linear_from_lab(lab_from_rgb8(c))) == c);
    }
}

TEST_CASE("CIEDE2000 reproduces Sharma, Wu & Dalal (2005) test pairs") {
    struct Pair {
        Lab x, y;
        double expected;
    };
    // Pairs 1, 7, 12 (approx. pairs 1, 13 in their Table 1 ordering) and the large-difference pair 20.
    const Pair pairs[] = {
        {{50.0, 2.6772, -79.7751}, {50.0, 0.0, -82.7485}, 2.0425},
        {{50.0, 0.0, 0.0}, {50.0, -1.0, 2.0}, 2.3669},
        {{50.0, 2.5, 0.0}, {50.0, 0.0, -2.5}, 4.3065},
        {{50.0, 2.5, 0.0}, {73.0, 25.0, -18.0}, 27.1492},
        {{60.2574, -34.0099, 36.2677}, {60.4626, -34.1751, 39.4387}, 1.2644},
    };
    for (const Pair& p : pairs) {
        CHECK(delta_e2000(p.x, p.y) == Approx(p.expected).margin(1e-4));
        CHECK(delta_e2000(p.y, p.x) == Approx(p.expected).margin(1e-4));
    }
}

TEST_CASE("Colour-vision simulation keeps greys and merges red with green") {
    for (Deficiency d : {Deficiency::protanopia, Deficiency::deuteranopia}) {
        const Rgb8 grey{128, 128, 128};
        const Rgb8 g = simulate(grey, d);
        CHECK(std::abs(g.r - 128) <= 1);
        CHECK(std::abs(g.g - 128) <= 1);
        CHECK(std::abs(g.b - 128) <= 1);
        // A red and a green that differ a lot for normal vision come much closer.
        const Rgb8 red{200, 80, 60}, green{110, 140, 60};
        const double normal = delta_e2000(lab_from_rgb8(red), lab_from_rgb8(green));
        const double seen = delta_e2000(lab_from_rgb8(simulate(red, d)), lab_from_rgb8(simulate(green, d)));
        CHECK(seen < normal / 2);
    }
}
