// Loading a scenario: parse the TOML, apply --set overrides, read every key, load the map,
// check the rules between values, and report every problem found at once.
#include "io/scenario_loader.hpp"

#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "io/scenario_findings.hpp"

namespace tessera {

std::string Diagnostic::to_string() const {
    std::string out = file;
    if (line > 0) {
        out += ':';
        out += std::to_string(line);
    }
    out += ": ";
    if (!key.empty()) out += key + ": ";
    return out + message;
}

namespace {

std::string join_messages(const std::vector<Diagnostic>& diagnostics) {
    std::string out;
    for (const Diagnostic& d : diagnostics) {
        if (!out.empty()) out += '\n';
        out += d.to_string();
    }
    return out;
}

}  // namespace

ScenarioError::ScenarioError(std::vector<Diagnostic> diagnostics)
    : std::runtime_error(join_messages(diagnostics)), diagnostics_(std::move(diagnostics)) {}

Scenario load_scenario(const std::string& path, const std::vector<std::string>& overrides) {
    std::ifstream in(path, std::ios::binary);
    if (!in) {
        const std::string why = std::strerror(errno);
        throw ScenarioError({{path, 0, "", "cannot open the scenario file (" + why + "); accepted: a readable TOML file"}});
    }
    std::ostringstream text;
    text << in.rdbuf();
    // An empty file, or one of comments only, is almost always the wrong file: refuse it rather
    // than run every default. (parse_scenario itself accepts empty text, for --set-only tests.)
    bool empty = false;
    try {
        empty = toml::parse(text.str(), path).empty();
    } catch (const toml::parse_error&) {
        // parse_scenario reports it, with its line.
    }
    if (empty) {
        throw ScenarioError({{path, 0, "",
                              "the file holds no settings (it is empty or only comments); accepted: a scenario with "
                              "at least one setting, e.g. title = \"...\" (docs/formats.md lists every key)"}});
    }
    return parse_scenario(text.str(), path, overrides);
}

Scenario parse_scenario(const std::string& text, const std::string& name, const std::vector<std::string>& overrides) {
    // Every parsed node carries `file` as its source path; --set nodes carry none.
    const std::string file = name.empty() ? "<scenario>" : name;
    toml::table root;
    try {
        root = toml::parse(text, file);
    } catch (const toml::parse_error& e) {
        throw ScenarioError({{file, static_cast<int>(e.source().begin.line), "",
                              "not valid TOML: " + std::string(e.description()) +
                                  "; accepted: TOML syntax (key = value, [table], [[array of tables]])"}});
    }
    scenario_io::Findings findings(file);
    Scenario s;
    s.source_path = file;
    scenario_io::apply_overrides(root, overrides, findings);
    scenario_io::read_scenario(root, s, findings);
    scenario_io::apply_habitat_map(s, findings);
    scenario_io::check_scenario(s, findings);
    if (!findings.empty()) throw ScenarioError(findings.sorted());
    return s;
}

}  // namespace tessera
