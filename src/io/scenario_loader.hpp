// Reading a scenario file (TOML) into a validated Scenario.
//
// Every key has a default; unknown keys are errors with a "did you mean" suggestion; every
// value is range-checked. All problems found are collected and reported together, each as
// `file:line: key: what is wrong; what is accepted`. `--set key=value` overrides go through
// the same checks (their place reads `--set key`).
#pragma once

#include <stdexcept>
#include <string>
#include <vector>

#include "core/scenario.hpp"

namespace tessera {

struct Diagnostic {
    std::string file;  // the scenario file, or "--set" for an override
    int line = 0;      // 0 when there is no line (a missing file, an override)
    std::string key;   // dotted key, e.g. "rates.transfer" or "inoculum[2].where"
    std::string message;  // what is wrong; what is accepted

    std::string to_string() const;  // "file:line: key: message"
};

class ScenarioError : public std::runtime_error {
public:
    explicit ScenarioError(std::vector<Diagnostic> diagnostics);
    const std::vector<Diagnostic>& diagnostics() const { return diagnostics_; }

private:
    std::vector<Diagnostic> diagnostics_;
};

// Loads and validates `path`, applying `overrides` ("dotted.key=value", as given to --set)
// on top. Throws ScenarioError listing every problem; never returns a half-valid Scenario.
Scenario load_scenario(const std::string& path, const std::vector<std::string>& overrides = {});

// The same from text already in memory (tests, fuzzing); `name` stands for the file name.
Scenario parse_scenario(const std::string& text, const std::string& name,
                        const std::vector<std::string>& overrides = {});

}  // namespace tessera
