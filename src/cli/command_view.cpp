// tessera view SCENARIO [--set ...] [--record DIR]: the live window; with --record, frames
// are recorded to DIR from the first one (R stops and restarts).
#include <iostream>

#include "cli/render_commands.hpp"
#include "io/scenario_loader.hpp"
#include "render/viewer.hpp"

namespace tessera::cli {

int view_command(const ViewOptions& o) {
    const auto view = view_from_name(o.view);
    if (!view) {
        std::cerr << "error: --view " << o.view << ": unknown view; accepted: " << view_names() << "\n";
        return 2;
    }
    Scenario scenario;
    try {
        scenario = load_scenario(o.scenario, o.sets);
    } catch (const ScenarioError& e) {
        for (const Diagnostic& d : e.diagnostics()) std::cerr << d.to_string() << "\n";
        return 2;
    }
    ViewerOptions options;
    if (!o.record.empty()) {
        options.record_dir = o.record;
        options.record_at_start = true;  // "--record DIR" records what the window shows from the start
    }
    options.script = o.script;
    options.frames = o.frames;
    options.view = *view;
    return run_viewer(scenario, options);
}

}  // namespace tessera::cli
