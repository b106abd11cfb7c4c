// tessera view SCENARIO [--set ...] [--record DIR]: the live window; with --record, frames
// are recorded to DIR from the first one (R stops and restarts); with --predict ode the live
// plot overlays the deterministic model at this K.
#include <iostream>

#include "cli/render_commands.hpp"
#include "cli/scenario_input.hpp"
#include "render/viewer.hpp"

namespace tessera::cli {

int view_command(const ViewOptions& o) {
    const auto view = view_from_name(o.view);
    if (!view) {
        std::cerr << "error: --view " << o.view << ": unknown view; accepted: " << view_names() << "\n";
        return 2;
    }
    const auto loaded = load_or_report(o.scenario, o.sets);
    if (!loaded) return 2;
    ViewerOptions options;
    if (!o.record.empty()) {
        options.record_dir = o.record;
        options.record_at_start = true;  // "--record DIR" records what the window shows from the start
    }
    options.script = o.script;
    options.frames = o.frames;
    options.view = *view;
    options.predict_ode = o.predict == "ode";
    return run_viewer(*loaded, options);
}

}  // namespace tessera::cli
