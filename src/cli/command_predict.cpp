// tessera predict: load, choose the model (limit for one patch, ode for a lattice), refuse
// a model that does not apply, prepare the directory, write the resolved scenario, run it.
#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/output_directory.hpp"
#include "cli/predict_models.hpp"
#include "cli/scenario_input.hpp"
#include "io/scenario_writer.hpp"
#include "theory/exponent_limit.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

int predict_command(const PredictOptions& o) {
    const auto loaded = load_or_report(o.scenario, o.sets);
    if (!loaded) return 2;
    const Scenario& scenario = *loaded;
    const bool one_patch = scenario.width * scenario.height == 1;
    const std::string model = o.model.empty() ? (one_patch ? "limit" : "ode") : o.model;
    if (model == "limit") {
        if (const auto why = limit_not_applicable(scenario)) {
            std::cerr << o.scenario << ": --model limit: " << *why << "; use --model ode for the deterministic model\n";
            return 2;
        }
    }
    const fs::path dir = o.out.empty() ? fs::path(fs::path(o.scenario).stem().string() + "-predict") : fs::path(o.out);
    // A prediction may go beside a run (plots overlay them); only an earlier prediction of the
    // same model needs --overwrite.
    const std::vector<std::string> markers =
        model == "limit" ? std::vector<std::string>{"limit_series.csv", "limit_phases.csv"}
                         : std::vector<std::string>{"ode_series.csv", "ode_habitat_series.csv", "ode_fields.h5"};
    if (!prepare_directory(dir, o.overwrite, markers)) return 2;
    // TODO(session 3): a run's own scenario.resolved.toml in `dir` must not be replaced by a
    // different one.
    if (!write_text(dir / "scenario.resolved.toml", resolved_scenario_toml(scenario))) {
        std::cerr << "error: cannot write " << (dir / "scenario.resolved.toml").string() << "\n";
        return 2;
    }
    return model == "limit" ? predict_limit_into(scenario, dir, o.quiet) : predict_ode_into(scenario, dir, o.quiet);
}

}  // namespace tessera::cli
