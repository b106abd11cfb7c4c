#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/run_session.hpp"
#include "io/scenario_loader.hpp"

namespace tessera::cli {

int run_command(const RunOptions& o) {
    Scenario scenario;
    try {
        scenario = load_scenario(o.scenario, o.sets);
    } catch (const ScenarioError& e) {
        for (const Diagnostic& d : e.diagnostics()) std::cerr << d.to_string() << "\n";
        return 2;
    }
    if (o.seed) scenario.seed = *o.seed;
    if (o.threads) scenario.threads = *o.threads;
    const std::string out =
        o.out.empty() ? std::filesystem::path(o.scenario).stem().string() + "-run" : o.out;
    return run_session(scenario, out, {o.replicates, o.quiet, o.overwrite});
}

}  // namespace tessera::cli
