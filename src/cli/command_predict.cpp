// tessera predict: load, choose the model (limit for one patch, ode for a lattice), refuse
// a model that does not apply, prepare the directory, write the resolved scenario, run it.
#include <filesystem>
#include <fstream>
#include <sstream>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/output_directory.hpp"
#include "cli/predict_models.hpp"
#include "cli/scenario_input.hpp"
#include "io/scenario_writer.hpp"
#include "theory/exponent_limit.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::string read_text(const fs::path& file) {
    std::ifstream in(file, std::ios::binary);
    std::ostringstream text;
    text << in.rdbuf();
    return text.str();
}

}  // namespace

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
    // A run writes limit_series.csv beside its series, so only limit_phases.csv marks an
    // earlier limit prediction.
    const std::vector<std::string> markers =
        model == "limit" ? std::vector<std::string>{"limit_phases.csv"}
                         : std::vector<std::string>{"ode_series.csv", "ode_habitat_series.csv", "ode_fields.h5"};
    if (!prepare_directory(dir, o.overwrite, markers)) return 2;
    // A run's own scenario.resolved.toml in `dir` describes its series; a prediction of a
    // different scenario (other --set values) goes beside it under its own name.
    const std::string text = resolved_scenario_toml(scenario);
    fs::path resolved = dir / "scenario.resolved.toml";
    if (fs::exists(dir / "series.csv") && fs::exists(resolved) && read_text(resolved) != text) {
        resolved = dir / "predict.resolved.toml";
        if (!o.quiet)
            std::cout << "note: " << (dir / "scenario.resolved.toml").string()
                      << " is the run's and differs from this scenario; the prediction's settings go to "
                      << resolved.string() << "\n";
    }
    if (!write_text(resolved, text)) {
        std::cerr << "error: cannot write " << resolved.string() << "\n";
        return 2;
    }
    return model == "limit" ? predict_limit_into(scenario, dir, o.quiet) : predict_ode_into(scenario, dir, o.quiet);
}

}  // namespace tessera::cli
