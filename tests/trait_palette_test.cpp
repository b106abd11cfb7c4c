// The trait palette's promises: every trait distinguishable from every other, for normal
// vision and for red-green dichromats (simulated), on every grid up to 5 x 5; each axis
// readable along its own direction.
#include <catch2/catch.hpp>

#include <algorithm>
#include <limits>
#include <vector>

#include "render/colour_vision.hpp"
#include "render/trait_palette.hpp"

using namespace tessera;

namespace {

// Thresholds in CIEDE2000 units. About 1 is "just noticeable" side by side; 5 and more is
// clearly different. Normal vision gets a wider margin; dichromats see a flattened space
// (lightness and blue-yellow only), so their threshold is lower but still clearly apart.
constexpr double normal_threshold = 8.0;
constexpr double dichromat_threshold = 5.0;

double min_distance(const std::vector<Rgb8>& colours, const Deficiency* seen_as) {
    double least = std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < colours.size(); ++i) {
        for (std::size_t j = i + 1; j < colours.size(); ++j) {
            Rgb8 a = colours[i], b = colours[j];
            if (seen_as) {
                a = simulate(a, *seen_as);
                b = simulate(b, *seen_as);
            }
            least = std::min(least, delta_e2000(lab_from_rgb8(a), lab_from_rgb8(b)));
        }
    }
    return least;
}

}  // namespace

TEST_CASE("every trait colour differs from every other on grids up to 5 x 5") {
    for (int nx = 1; nx <= 5; ++nx) {
        for (int ny = 1; ny <= 5; ++ny) {
            if (nx * ny < 2) continue;
            const TraitPalette palette(nx, ny);
            INFO("grid " << nx << " x " << ny);
            CHECK(palette.size() == nx * ny);
            CHECK(min_distance(palette.colours(), nullptr) > normal_threshold);
            for (Deficiency d : {Deficiency::protanopia, Deficiency::deuteranopia}) {
                INFO((d == Deficiency::protanopia ? "protanopia" : "deuteranopia"));
                CHECK(min_distance(palette.colours(), &d) > dichromat_threshold);
            }
        }
    }
}

TEST_CASE("dormancy reads as lightness, transfer as hue") {
    const TraitPalette palette(5, 5);
    for (int y = 0; y < 5; ++y) {
        for (int x = 1; x < 5; ++x) {
            // More dormancy ability: lighter, by a clear step, in every column.
            CHECK(lab_from_rgb8(palette.colour(x, y)).L > lab_from_rgb8(palette.colour(x - 1, y)).L + 8.0);
        }
    }
    for (int x = 0; x < 5; ++x) {
        for (int y = 1; y < 5; ++y) {
            // More transfer ability: towards yellow-green (b* up) in every row; lightness
            // moves little compared with the dormancy steps.
            const Lab lo = lab_from_rgb8(palette.colour(x, y - 1)), hi = lab_from_rgb8(palette.colour(x, y));
            CHECK(hi.b > lo.b);
            CHECK(std::abs(hi.L - lo.L) < 3.0);
        }
    }
}

TEST_CASE("a single-level axis sits in the middle of the design space") {
    const TraitPalette one(1, 1);
    CHECK(one.colour(0) == TraitPalette::at(0.5, 0.5));
    const TraitPalette column(3, 1);
    CHECK(column.colour(1, 0) == TraitPalette::at(0.5, 0.5));
}
