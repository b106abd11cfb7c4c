// The shared notebook of the scenario loader's steps (reading, --set overrides, maps,
// checks): every problem found so far, and where each key was written, so that a check
// made long after parsing still names the file and line of the value it is about.
#pragma once

#include <map>
#include <string>
#include <string_view>
#include <vector>

#include <toml++/toml.h>

#include "io/scenario_loader.hpp"

namespace tessera::scenario_io {

inline constexpr std::string_view set_file = "--set";

struct Place {
    std::string file;
    int line = 0;
};

// Where a parsed node came from. Nodes with no source (inserted by --set) read "--set".
Place place_of(const toml::source_region& region);

class Findings {
public:
    explicit Findings(std::string file) : file_(std::move(file)) {}

    const std::string& file() const { return file_; }

    void remember(const std::string& key, Place place) { places_[key] = std::move(place); }
    bool has(std::string_view key) const { return places_.find(key) != places_.end(); }

    // The place of `key`; if it was not written, that of its nearest written parent
    // ("inoculum[2].trait" -> "inoculum[2]" -> "inoculum"); otherwise the file, line 0.
    Place place(std::string_view key) const;
    // The place of the first of `keys` that was written, else place(keys[0]).
    Place place_any(std::initializer_list<std::string_view> keys) const;

    void add(Place place, std::string key, std::string message);
    void add(const std::string& key, std::string message) { add(place(key), key, std::move(message)); }

    bool empty() const { return diagnostics_.empty(); }
    std::size_t count() const { return diagnostics_.size(); }
    // Every diagnostic, file lines first in line order, then the --set ones in given order.
    std::vector<Diagnostic> sorted() const;

private:
    std::string file_;
    std::map<std::string, Place, std::less<>> places_;
    std::vector<Diagnostic> diagnostics_;
};

// The steps of loading, in the order load_scenario runs them.
void apply_overrides(toml::table& root, const std::vector<std::string>& overrides, Findings& findings);
void read_scenario(const toml::table& root, Scenario& scenario, Findings& findings);
void apply_habitat_map(Scenario& scenario, Findings& findings);
void check_scenario(const Scenario& scenario, Findings& findings);

}  // namespace tessera::scenario_io
