// The trait palette's promises (render/trait_palette.hpp): every trait distinguishable from
// every other, for normal vision, for red-green dichromats (simulated) and when dimmed to
// half fullness, on every grid up to 5 x 5; every trait bright when its patch is full; each
// axis readable along its own direction.
#include <catch2/catch.hpp>

#include <algorithm>
#include <limits>
#include <vector>

#include "render/colour_vision.hpp"
#include "render/rasteriser.hpp"
#include "render/trait_palette.hpp"

using namespace tessera;

namespace {

// Thresholds in CIEDE2000 units. About 1 is "just noticeable" side by side; 3 is plainly
// visible, 5 and more clearly different. Normal vision gets the widest margin. Dichromats
// see a flattened space (lightness and blue-yellow only) and lightness is kept for
// fullness, so 25 traits cannot be as far apart for them; dimmed colours are darker and
// less saturated, so they too get a lower bar.
constexpr double normal_threshold = 7.0;
constexpr double dichromat_threshold = 3.0;
constexpr double half_full_threshold = 5.0;
// A full patch of any trait must look bright: L* of every trait colour above this (the
// empty colour has L* 7).
constexpr double full_lightness = 60.0;

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

std::vector<Rgb8> dimmed(const std::vector<Rgb8>& colours, double fill) {
    std::vector<Rgb8> out;
    for (Rgb8 c : colours) out.push_back(fill_shade(c, fill));
    return out;
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
            // Half fullness (log(1+N)/log K_p = 0.5, i.e. about sqrt(K_p) cells), as drawn.
            CHECK(min_distance(dimmed(palette.colours(), 0.5), nullptr) > half_full_threshold);
        }
    }
}

TEST_CASE("the demo's 3 x 3 grid keeps wider margins") {
    // tube-wall uses 3 x 3; there the colours are much further apart than the 5 x 5 bound.
    const TraitPalette palette(3, 3);
    CHECK(min_distance(palette.colours(), nullptr) > 15.0);
    for (Deficiency d : {Deficiency::protanopia, Deficiency::deuteranopia}) CHECK(min_distance(palette.colours(), &d) > 6.0);
    CHECK(min_distance(dimmed(palette.colours(), 0.5), nullptr) > 10.0);
}

TEST_CASE("a full patch of any trait is bright, and brighter than any half-full patch") {
    for (int n = 1; n <= 5; ++n) {
        const TraitPalette palette(n, n);
        double darkest_full = 100.0, lightest_half = 0.0;
        for (Rgb8 c : palette.colours()) {
            darkest_full = std::min(darkest_full, lab_from_rgb8(c).L);
            lightest_half = std::max(lightest_half, lab_from_rgb8(fill_shade(c, 0.5)).L);
        }
        INFO("grid " << n << " x " << n);
        CHECK(darkest_full > full_lightness);
        CHECK(darkest_full > lightest_half);
    }
}

TEST_CASE("transfer reads along blue-yellow (b*), dormancy along a* and for dichromats also lightness") {
    const TraitPalette palette(5, 5);
    for (double fill : {1.0, 0.5}) {
        INFO("fill " << fill);
        auto lab = [&](int x, int y) { return lab_from_rgb8(fill_shade(palette.colour(x, y), fill)); };
        for (int x = 0; x < 5; ++x) {
            for (int y = 1; y < 5; ++y) {
                // More transfer ability: towards yellow, by a clear step, in every row and
                // for dichromats too (blue-yellow is what they keep).
                CHECK(lab(x, y).b > lab(x, y - 1).b + 5.0 * fill);
                for (Deficiency d : {Deficiency::protanopia, Deficiency::deuteranopia}) {
                    const Rgb8 lo = simulate(fill_shade(palette.colour(x, y - 1), fill), d);
                    const Rgb8 hi = simulate(fill_shade(palette.colour(x, y), fill), d);
                    CHECK(lab_from_rgb8(hi).b > lab_from_rgb8(lo).b + 3.0 * fill);
                }
            }
        }
        for (int y = 0; y < 5; ++y) {
            for (int x = 1; x < 5; ++x) {
                // More dormancy ability: towards violet-pink (a* up) in every column, and a
                // little darker, the cue that survives red-green dichromacy.
                CHECK(lab(x, y).a > lab(x - 1, y).a + 5.0 * fill);
                CHECK(lab(x, y).L < lab(x - 1, y).L);
            }
        }
    }
}

TEST_CASE("the design is the one documented: L* 82 - 19 sx + 8 sy, all colours in gamut or fitted") {
    const Lab corner = TraitPalette::design_lab(0.0, 0.0);
    CHECK(corner.L == Approx(82.0));
    CHECK(corner.a == Approx(-22.0 - 25.0 * 0.25));
    CHECK(corner.b == Approx(-29.0));
    for (double sx : {0.0, 0.5, 1.0}) {
        for (double sy : {0.0, 0.5, 1.0}) {
            // Gamut fitting keeps lightness (to rounding), only chroma gives way.
            CHECK(lab_from_rgb8(TraitPalette::at(sx, sy)).L == Approx(TraitPalette::design_lab(sx, sy).L).margin(0.6));
        }
    }
}

TEST_CASE("a single-level axis sits in the middle of the design space") {
    const TraitPalette one(1, 1);
    CHECK(one.colour(0) == TraitPalette::at(0.5, 0.5));
    const TraitPalette column(3, 1);
    CHECK(column.colour(1, 0) == TraitPalette::at(0.5, 0.5));
}
