// The window under a virtual display (ctest runs this with xvfb-run -a): open it on a small
// scenario, drive it through the scripted input (frames, keys, a click), save a screenshot
// and check that it shows a lattice and a legend, not a blank window; resize it by script
// and check the layout follows.
#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>

#include <algorithm>
#include <filesystem>
#include <set>
#include <string>
#include <vector>

#include "render/colour_ramps.hpp"
#include "render/trait_palette.hpp"
#include "render/viewer.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

// A small lattice filled with cells of trait (0,0) at K = 100, for the window to show.
Scenario small_scenario(const char* title, int width, int height) {
    Scenario sc;
    sc.title = title;
    sc.K = 100;
    sc.width = width;
    sc.height = height;
    sc.habitats = {Habitat{}};
    sc.habitat_of_patch.assign(static_cast<std::size_t>(width * height), 0);
    Inoculum in;
    in.exponent = 1.0;
    sc.inocula = {in};
    sc.until = 3.0;
    sc.output_every = 0.05;
    return sc;
}

// An empty directory of that name under the system's temporary directory.
fs::path fresh_dir(const char* name) {
    const fs::path dir = fs::temp_directory_path() / name;
    fs::remove_all(dir);
    fs::create_directories(dir);
    return dir;
}

// Far from blank: lattice, text and plot lines make many colours.
void check_not_blank(const sf::Image& image) {
    const auto size = image.getSize();
    std::set<std::uint32_t> colours;
    for (unsigned y = 0; y < size.y; y += 2) {
        for (unsigned x = 0; x < size.x; x += 2) colours.insert(image.getPixel(x, y).toInteger());
    }
    CHECK(colours.size() > 50);
}

// The legend's trait swatches are in the side panel (the right 300 px): each trait colour
// of the 3 x 3 palette appears there.
void check_legend(const sf::Image& image) {
    const auto size = image.getSize();
    const TraitPalette palette(3, 3);
    for (int t = 0; t < palette.size(); ++t) {
        bool found = false;
        const sf::Color want(palette.colour(t).r, palette.colour(t).g, palette.colour(t).b);
        for (unsigned y = 0; y < size.y && !found; ++y) {
            for (unsigned x = size.x - 300; x < size.x && !found; ++x) found = image.getPixel(x, y) == want;
        }
        INFO("trait " << t);
        CHECK(found);
    }
}

}  // namespace

TEST_CASE("the viewer runs scripted frames and keys and shows lattice and legend") {
    const Scenario sc = small_scenario("viewer smoke test", 12, 8);
    const fs::path dir = fresh_dir("tessera_viewer_smoke");
    const fs::path shot = dir / "shot.png", help = dir / "help.png";
    ViewerOptions o;
    o.record_dir = (dir / "rec").string();
    o.script = "frames=20;click=3,4;key=R;frames=10;key=R;key=V;key=V;key=V;key=V;key=V;key=V;key=Plus;"
               "key=Space;key=S;frames=5;screenshot=" + shot.string() + ";key=H;screenshot=" + help.string() + ";key=N;frames=5;quit";
    o.frames = 2000;  // a safety net: the script quits long before
    REQUIRE(run_viewer(sc, o) == 0);

    sf::Image image;
    REQUIRE(image.loadFromFile(shot.string()));
    const auto size = image.getSize();
    REQUIRE(size.x >= 600);
    check_not_blank(image);

    check_legend(image);
    CHECK(fs::exists(dir / "rec" / "frame_000000.png"));
    sf::Image with_help;
    REQUIRE(with_help.loadFromFile(help.string()));
    CHECK(with_help.getPixel(size.x / 2, size.y / 2) != image.getPixel(size.x / 2, size.y / 2));
    fs::remove_all(dir);
}

namespace {

// The bounding box of the pure white pixels left of the side panel and above the plot:
// there the only pure white is the outline around the selected patch, one patch plus a
// pixel on each side, so its width and height are the lattice scale + 2.
struct Box {
    int x0 = 1 << 30, y0 = 1 << 30, x1 = -1, y1 = -1;
    int w() const { return x1 - x0 + 1; }
    int h() const { return y1 - y0 + 1; }
};

Box selection_outline(const sf::Image& image) {
    Box b;
    const auto size = image.getSize();
    for (unsigned y = 0; y + 230 < size.y; ++y) {
        for (unsigned x = 0; x + 300 < size.x; ++x) {
            if (image.getPixel(x, y) != sf::Color::White) continue;
            b.x0 = std::min(b.x0, static_cast<int>(x));
            b.y0 = std::min(b.y0, static_cast<int>(y));
            b.x1 = std::max(b.x1, static_cast<int>(x));
            b.y1 = std::max(b.y1, static_cast<int>(y));
        }
    }
    return b;
}

}  // namespace

TEST_CASE("resize=W,H lays the window out again: new size, square patches that fit, legend in the panel") {
    const Scenario sc = small_scenario("viewer resize test", 12, 8);
    const fs::path dir = fresh_dir("tessera_viewer_resize");
    struct Case {
        unsigned w, h;            // asked for
        unsigned want_w, want_h;  // the window it gets
        fs::path file;
    };
    // Smaller, larger, and below the smallest size (which stops at the smallest size).
    const std::vector<Case> cases = {{900, 640, 900, 640, dir / "small.png"},
                                     {1400, 980, 1400, 980, dir / "large.png"},
                                     {300, 200, viewer_min_width, viewer_min_height, dir / "tiny.png"}};
    ViewerOptions o;
    o.script = "frames=10;click=5,3";
    for (const Case& c : cases) {
        o.script += ";resize=" + std::to_string(c.w) + "," + std::to_string(c.h) + ";frames=3;screenshot=" + c.file.string();
    }
    o.script += ";quit";
    o.frames = 2000;
    REQUIRE(run_viewer(sc, o) == 0);

    for (const Case& c : cases) {
        INFO("resize=" << c.w << "," << c.h);
        sf::Image image;
        REQUIRE(image.loadFromFile(c.file.string()));
        const auto size = image.getSize();
        CHECK(size.x == c.want_w);
        CHECK(size.y == c.want_h);

        check_not_blank(image);

        // The selected patch is square and lies inside the lattice area, which is laid
        // out for the new size: 12 x 8 patches at (side - 2) pixels each fit in it.
        const Box outline = selection_outline(image);
        REQUIRE(outline.x1 >= 0);
        CHECK(outline.w() == outline.h());
        const int scale = outline.w() - 2;
        const int area_w = static_cast<int>(size.x) - 320, area_h = static_cast<int>(size.y) - 250;  // less margins
        CHECK(scale >= 1);
        CHECK(12 * scale <= area_w);
        CHECK(8 * scale <= area_h);
        CHECK(outline.x1 < static_cast<int>(size.x) - 300);
        // The lattice fills the area as well as a whole number of pixels per patch can: one
        // pixel more per patch would not fit.
        CHECK((12 * (scale + 1) > area_w || 8 * (scale + 1) > area_h));

        check_legend(image);  // still drawn in the side panel
    }
    fs::remove_all(dir);
}

TEST_CASE("a bad resize step is refused before the window opens") {
    Scenario sc;
    sc.width = 2;
    sc.height = 2;
    sc.habitats = {Habitat{}};
    sc.habitat_of_patch.assign(4, 0);
    for (const char* bad : {"resize=800", "resize=0,600", "resize=800,x", "resize=-5,600", "resize=99999,600", "resize=800,600,1"}) {
        ViewerOptions o;
        o.script = std::string("frames=1;") + bad + ";quit";
        INFO(bad);
        CHECK(run_viewer(sc, o) == 2);
    }
}

TEST_CASE("--record records from the first frame; R stops, and starting again numbers on") {
    const Scenario sc = small_scenario("viewer record test", 6, 4);
    const fs::path dir = fresh_dir("tessera_viewer_record");
    ViewerOptions o;
    o.record_dir = (dir / "rec").string();
    o.record_at_start = true;  // what `tessera view --record DIR` sets
    o.script = "frames=1;key=R;frames=5;key=R;frames=5;quit";
    o.frames = 2000;
    REQUIRE(run_viewer(sc, o) == 0);
    // Frame 0 was written before any key was pressed; the second start wrote the next
    // number, not frame 0 again.
    REQUIRE(fs::exists(dir / "rec" / "frame_000000.png"));
    CHECK(fs::exists(dir / "rec" / "frame_000001.png"));
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(dir / "rec")) files += e.path().extension() == ".png";
    CHECK(files >= 2);
    fs::remove_all(dir);
}

// tessera view --predict ode: the deterministic model at this K is drawn dotted over the
// whole time axis of the live plot, so right of "now" (early in a long run) trait colours
// appear there beyond the limit's dashes only with it. Counted in the plot strip at the
// bottom of the window, right half, left of the side panel.
TEST_CASE("--predict ode draws the deterministic model in the live plot") {
    Scenario sc = small_scenario("ode overlay", 1, 1);
    sc.until = 400.0;
    const fs::path dir = fresh_dir("tessera-viewer-ode");
    auto count_traits = [&](bool ode, const char* name) {
        ViewerOptions o;
        o.predict_ode = ode;
        const fs::path shot = dir / name;
        o.script = "frames=5;screenshot=" + shot.string() + ";quit";
        REQUIRE(run_viewer(sc, o) == 0);
        sf::Image image;
        REQUIRE(image.loadFromFile(shot.string()));
        const TraitPalette palette(3, 3);
        std::set<std::uint32_t> colours;
        for (int t = 0; t < palette.size(); ++t) {
            colours.insert(sf::Color(palette.colour(t).r, palette.colour(t).g, palette.colour(t).b).toInteger());
        }
        const auto size = image.getSize();
        int n = 0;
        for (unsigned y = size.y - 220; y < size.y; ++y) {
            for (unsigned x = size.x / 2; x < size.x - 320; ++x) n += colours.count(image.getPixel(x, y).toInteger()) > 0;
        }
        return n;
    };
    const int without = count_traits(false, "without.png");
    const int with = count_traits(true, "with.png");
    INFO("trait-coloured pixels right of now: " << without << " without, " << with << " with the model");
    CHECK(with > without + 20);
}
