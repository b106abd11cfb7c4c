#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/render_commands.hpp"
#include "cli/run_session.hpp"
#include "cli/scenario_input.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

// The bundled scenarios: next to the source tree when run from a build directory.
fs::path demo_scenario() {
    const fs::path built_in = fs::path(TESSERA_MAPS_DIR) / "tube-wall" / "scenario.toml";
    if (fs::exists(built_in)) return built_in;
    return fs::path("maps") / "tube-wall" / "scenario.toml";
}

}  // namespace

int demo_command(const DemoOptions& o) {
    const fs::path file = demo_scenario();
    const auto loaded = load_or_report(file.string());
    if (!loaded) return 1;  // the bundled scenario is ours: a failure here is an internal error
    Scenario scenario = *loaded;
    if (o.threads) scenario.threads = *o.threads;
    if (!o.quiet) {
        std::cout << "tessera demo: " << scenario.title << "\n"
                  << "scenario: " << file.string() << "\n";
    }
    int code = run_session(scenario, o.out, {1, o.quiet, true});
    // The figures beside the frames: exponents of every trait, and one panel per habitat.
    for (const char* what : {"exponents", "habitats"}) {
        if (code != 0) break;
        PlotOptions plot;
        plot.dir = o.out;
        plot.what = what;
        plot.quiet = true;
        code = plot_command(plot);
    }
    if (code == 0 && !o.quiet) {
        const std::string d = o.out + "/";
        std::cout << "\nWhat to look at:\n"
                  << "  " << d << "exponents.png         each trait's exponent over time, the antibiotic pulses shaded\n"
                  << "  " << d << "habitats.png          the same per habitat: the treated band empties in every pulse and refills\n"
                  << "  " << d << "frames/               one picture every 0.2 t/lnK: the dominant trait per patch,\n"
                  << "                                   habitats outlined, the pulse named in the header when on\n"
                  << "  " << d << "series.csv            per-trait totals over time (t and t/lnK)\n"
                  << "  " << d << "habitat_series.csv    the same per habitat (biofilm, poor, treated)\n"
                  << "  " << d << "fields.h5             per-patch counts at every frame (HDF5)\n"
                  << "  " << d << "scenario.resolved.toml every setting used\n"
                  << "\nWatch it live (needs a display):\n"
                  << "  " << o.program << " view " << file.string() << "\n"
                  << "Draw other views from the saved fields, e.g. the dormant fraction:\n"
                  << "  " << o.program << " render " << o.out << " --out " << d << "dormant --view dormant\n"
                  << "\nAn invented scenario for research and teaching, not guidance for clinical or\n"
                  << "environmental decisions.\n";
    }
    return code;
}

}  // namespace tessera::cli
