#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/run_session.hpp"
#include "cli/scenario_input.hpp"

namespace tessera::cli {

int run_command(const RunOptions& o) {
    const auto loaded = load_or_report(o.scenario, o.sets);
    if (!loaded) return 2;
    Scenario scenario = *loaded;
    if (o.seed) scenario.seed = *o.seed;
    if (o.threads) scenario.threads = *o.threads;
    const std::string out =
        o.out.empty() ? std::filesystem::path(o.scenario).stem().string() + "-run" : o.out;
    return run_session(scenario, out, {o.replicates, o.quiet, o.overwrite});
}

}  // namespace tessera::cli
