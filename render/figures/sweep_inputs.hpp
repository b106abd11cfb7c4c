// The files of a sweep directory a regime map reads (docs/formats.md): points.csv,
// outcomes.csv and, when present, summary.csv. A directory is a sweep's when it holds
// points.csv and outcomes.csv. Problems are thrown as FigureInputError (file, line, column).
#pragma once

#include <string>
#include <vector>

#include "render/figures/run_inputs.hpp"

namespace tessera {

struct SweepOutcome {
    int point = 0;
    std::string source;  // "limit" or "run"
    int replicate = 0;
    std::string regime;     // extinct, resident, coexistence, cycling
    std::string residents;  // "x:y;x:y" or ""
};

struct SweepSummaryRow {
    int point = 0;
    std::string source;
    int replicates = 0;
    std::string kind;  // "regime" or "resident"
    std::string name;
    double fraction = 0.0;
};

struct SweepInputs {
    std::string dir;
    std::vector<std::string> keys;             // the varied keys, as points.csv names them
    std::vector<int> points;                   // point ids in file order
    std::vector<std::vector<double>> values;   // [point row][key]
    std::vector<SweepOutcome> outcomes;
    std::vector<SweepSummaryRow> summary;      // empty when summary.csv is absent
    std::string title;                         // from scenario.resolved.toml when present
};

bool looks_like_sweep_directory(const std::string& dir);
SweepInputs read_sweep_inputs(const std::string& dir);

}  // namespace tessera
