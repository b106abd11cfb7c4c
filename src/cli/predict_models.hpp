// The two models of `tessera predict`, each writing its files into a prepared directory
// (command_predict.cpp loads the scenario, picks the model and prepares the directory).
#pragma once

#include <filesystem>

#include "core/scenario.hpp"

namespace tessera::cli {

// --model limit: limit_series.csv and limit_phases.csv, and the summary on stdout unless
// quiet. Returns the exit code.
int predict_limit_into(const Scenario& scenario, const std::filesystem::path& dir, bool quiet);

// Beside a fresh one-patch run: limit_series.csv when the limit applies (nothing, silently,
// when it does not). False only when the file cannot be written.
bool write_limit_beside_run(const Scenario& scenario, const std::filesystem::path& dir);

// --model ode: ode_series.csv, ode_habitat_series.csv and ode_fields.h5, and a summary on
// stdout unless quiet. Returns the exit code.
int predict_ode_into(const Scenario& scenario, const std::filesystem::path& dir, bool quiet);

}  // namespace tessera::cli
