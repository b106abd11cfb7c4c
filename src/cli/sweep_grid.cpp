#include "cli/sweep_grid.hpp"

#include <iostream>
#include <set>

#include "io/checksum.hpp"
#include "io/scenario_loader.hpp"
#include "io/scenario_writer.hpp"

namespace tessera::cli {

namespace {

// Enough lines to show what is wrong without burying the terminal under a large grid.
constexpr std::size_t max_reported = 12;

std::string key_of_set(const std::string& set) { return set.substr(0, set.find('=')); }

}  // namespace

std::optional<LoadedGrid> load_grid(const std::string& scenario_file, const std::vector<std::string>& sets,
                                    const std::vector<std::string>& vary) {
    std::vector<GridAxis> axes;
    bool bad = false;
    if (vary.empty()) {
        std::cerr << "error: --vary: give at least one axis, e.g. --vary rates.dormancy_probability=0:0.25:11\n";
        return std::nullopt;
    }
    for (const std::string& spec : vary) {
        try {
            axes.push_back(parse_vary(spec));
        } catch (const VaryError& e) {
            std::cerr << "error: " << e.what() << "\n";
            bad = true;
        }
    }
    if (bad) return std::nullopt;
    for (const std::string& s : sets) {
        for (const GridAxis& a : axes) {
            if (key_of_set(s) == a.key) {
                std::cerr << "error: --vary " << a.key << ": the key is also given to --set; give it in one place\n";
                bad = true;
            }
        }
    }
    LoadedGrid out;
    try {
        out.grid = ParameterGrid(std::move(axes));
    } catch (const VaryError& e) {
        std::cerr << "error: " << e.what() << "\n";
        return std::nullopt;
    }
    if (bad) return std::nullopt;

    std::set<std::string> reported;
    std::size_t failed_points = 0;
    out.scenarios.reserve(out.grid.size());
    std::uint64_t h = fnv1a64_offset_basis;
    for (std::size_t i = 0; i < out.grid.size(); ++i) {
        std::vector<std::string> overrides = sets;
        const std::vector<std::string> axis_sets = out.grid.overrides(i);
        overrides.insert(overrides.end(), axis_sets.begin(), axis_sets.end());
        try {
            out.scenarios.push_back(load_scenario(scenario_file, overrides));
            h = fnv1a64(resolved_scenario_toml(out.scenarios.back()), h);
        } catch (const ScenarioError& e) {
            ++failed_points;
            out.scenarios.emplace_back();
            for (const Diagnostic& d : e.diagnostics()) {
                // A problem with an axis value names the key and the value; any other (the
                // file itself, or a combination of values) names the point's values.
                std::string line, same;  // `same`: what makes two lines the same fault
                for (const std::string& a : axis_sets) {
                    if (key_of_set(a) == d.key) {
                        line = "--vary " + a + ": " + d.message;
                        same = d.key + ": " + d.message;  // an unknown key is reported once, not per value
                    }
                }
                if (line.empty()) {
                    std::string where;
                    for (const std::string& a : axis_sets) where += (where.empty() ? "" : ", ") + a;
                    line = d.to_string() + " (at the sweep point " + where + ")";
                    // The same fault at every point is reported once.
                    if (d.file != "--set") line = d.to_string();
                    same = line;
                }
                if (reported.size() < max_reported && reported.insert(same).second)
                    std::cerr << "error: " << line << "\n";
            }
        }
    }
    if (failed_points > 0) {
        std::cerr << "error: " << failed_points << " of " << out.grid.size()
                  << " sweep points do not load; nothing was run. Each point is checked as 'tessera check "
                  << scenario_file << " --set KEY=VALUE ...' would check it\n";
        return std::nullopt;
    }
    out.checksum = h;
    return out;
}

}  // namespace tessera::cli
