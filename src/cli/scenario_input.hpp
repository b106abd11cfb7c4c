// Loading a scenario for a subcommand: every problem goes to stderr, one line each
// (file:line: key: what is wrong; what is accepted), and the caller exits with code 2.
#pragma once

#include <iostream>
#include <optional>
#include <string>
#include <vector>

#include "io/scenario_loader.hpp"

namespace tessera::cli {

inline std::optional<Scenario> load_or_report(const std::string& path, const std::vector<std::string>& sets = {}) {
    try {
        return load_scenario(path, sets);
    } catch (const ScenarioError& e) {
        for (const Diagnostic& d : e.diagnostics()) std::cerr << d.to_string() << "\n";
        return std::nullopt;
    }
}

}  // namespace tessera::cli
