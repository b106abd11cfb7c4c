// The window under a virtual display (ctest runs this with xvfb-run -a): open it on a small
// scenario, drive it through the scripted input (frames, keys, a click), save a screenshot
// and check that it shows a lattice and a legend, not a blank window.
#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>

#include <filesystem>
#include <set>

#include "render/colour_ramps.hpp"
#include "render/trait_palette.hpp"
#include "render/viewer.hpp"

using namespace tessera;
namespace fs = std::filesystem;

TEST_CASE("the viewer runs scripted frames and keys and shows lattice and legend") {
    Scenario sc;
    sc.title = "viewer smoke test";
    sc.K = 100;
    sc.width = 12;
    sc.height = 8;
    Habitat open;
    sc.habitats = {open};
    sc.habitat_of_patch.assign(96, 0);
    Inoculum in;
    in.exponent = 1.0;
    sc.inocula = {in};
    sc.until = 3.0;
    sc.output_every = 0.05;

    const fs::path dir = fs::temp_directory_path() / "tessera_viewer_smoke";
    fs::remove_all(dir);
    fs::create_directories(dir);
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
    std::set<std::uint32_t> colours;
    for (unsigned y = 0; y < size.y; y += 2) {
        for (unsigned x = 0; x < size.x; x += 2) colours.insert(image.getPixel(x, y).toInteger());
    }
    CHECK(colours.size() > 50);  // lattice, text, plot lines: far from blank

    // The legend's trait swatches are in the side panel (the right 300 px): each trait
    // colour of the 3 x 3 palette appears there.
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
    CHECK(fs::exists(dir / "rec" / "frame_000000.png"));
    sf::Image with_help;
    REQUIRE(with_help.loadFromFile(help.string()));
    CHECK(with_help.getPixel(size.x / 2, size.y / 2) != image.getPixel(size.x / 2, size.y / 2));
    fs::remove_all(dir);
}

TEST_CASE("--record records from the first frame; R stops, and starting again numbers on") {
    Scenario sc;
    sc.title = "viewer record test";
    sc.K = 100;
    sc.width = 6;
    sc.height = 4;
    Habitat open;
    sc.habitats = {open};
    sc.habitat_of_patch.assign(24, 0);
    Inoculum in;
    in.exponent = 1.0;
    sc.inocula = {in};
    sc.until = 3.0;
    sc.output_every = 0.05;

    const fs::path dir = fs::temp_directory_path() / "tessera_viewer_record";
    fs::remove_all(dir);
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
