// The files of a run directory a figure reads (docs/formats.md): series.csv (required),
// habitat_series.csv, ensemble.csv, limit_series.csv, ode_series.csv and
// scenario.resolved.toml (required: title, K, traits, schedules). Every problem is thrown as
// FigureInputError naming the file (and line and column for a bad value).
#pragma once

#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/scenario.hpp"

namespace tessera {

class FigureInputError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// One row of series.csv, habitat_series.csv or ode_series.csv.
struct SeriesRow {
    int replicate = 0;
    double t = 0.0, t_logK = 0.0;
    int habitat = -1;  // index into the scenario's habitats; -1 for lattice totals
    int trait = 0;     // index in the trait order (core/trait_grid.hpp)
    double active = 0.0, dormant = 0.0;
    double exponent = 0.0;  // exponent_per_patch when the file has it, else see SeriesFile
};

struct SeriesFile {
    std::string path;
    std::vector<SeriesRow> rows;
    // true: `exponent` is the file's exponent_per_patch column; false: series.csv's
    // lattice-total `exponent` (or, for habitat_series.csv, computed here from the counts
    // with the capacity-weighted patches of the class, which is what exponent_per_patch is).
    bool per_patch = false;
};

struct EnsembleRow {
    double t = 0.0, t_logK = 0.0;
    int trait = 0;
    int replicates = 0;
    double present = 0.0;
    double median = 0.0, q10 = 0.0, q90 = 0.0;  // of the exponent (per patch when available)
    double count_median = 0.0, count_q10 = 0.0, count_q90 = 0.0;
};

struct LimitRow {
    double t_logK = 0.0;
    int trait = 0;
    double exponent = 0.0;
};

struct RunInputs {
    std::string dir;
    Scenario scenario;
    SeriesFile series;
    std::optional<SeriesFile> habitat_series;
    std::vector<EnsembleRow> ensemble;  // empty when ensemble.csv is absent
    bool ensemble_per_patch = true;
    std::vector<LimitRow> limit;        // empty when limit_series.csv is absent
    std::optional<SeriesFile> ode;
};

// True when `dir` holds a run's series.csv or scenario.resolved.toml (as opposed to a sweep).
bool looks_like_run_directory(const std::string& dir);

RunInputs read_run_inputs(const std::string& dir, bool with_habitats);

}  // namespace tessera
