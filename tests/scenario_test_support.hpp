// Helpers shared by the scenario loader's tests (scenario_*_test.cpp): temporary folders,
// the diagnostics of a text, and one scenario file that sets every key.
#pragma once

#include <catch2/catch.hpp>

#include <SFML/Graphics/Image.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <sstream>
#include <unistd.h>

#include "io/scenario_loader.hpp"
#include "io/scenario_writer.hpp"

namespace tessera::scenario_test {

namespace fs = std::filesystem;

// A fresh folder per test case, so files of one case never meet another's.
inline fs::path temp_dir(const std::string& name) {
    fs::path d = fs::temp_directory_path() / ("tessera_loader_test_" + std::to_string(::getpid())) / name;
    fs::remove_all(d);
    fs::create_directories(d);
    return d;
}

inline void write_file(const fs::path& p, const std::string& text) {
    std::ofstream out(p, std::ios::binary);
    out << text;
}

// The diagnostics `text` produces; fails the test if it loads.
inline std::vector<Diagnostic> errors_of(const std::string& text, const std::vector<std::string>& sets = {}) {
    try {
        parse_scenario(text, "bad.toml", sets);
    } catch (const ScenarioError& e) {
        return e.diagnostics();
    }
    FAIL("the scenario loaded, but errors were expected:\n" << text);
    return {};
}

inline std::string all_text(const std::vector<Diagnostic>& ds) {
    std::string out;
    for (const Diagnostic& d : ds) {
        out += d.to_string();
        out += '\n';
    }
    return out;
}

// The one diagnostic about `key`; fails unless there is exactly one.
inline Diagnostic only_about(const std::vector<Diagnostic>& ds, const std::string& key) {
    std::vector<Diagnostic> found;
    for (const Diagnostic& d : ds)
        if (d.key == key) found.push_back(d);
    INFO(all_text(ds));
    REQUIRE(found.size() == 1);
    return found[0];
}

// Checks that `text` fails with a diagnostic on `line` about `key` whose message contains
// every one of `parts`.
inline void expect_error(const std::string& text, int line, const std::string& key, std::vector<std::string> parts) {
    const auto ds = errors_of(text);
    const Diagnostic d = only_about(ds, key);
    INFO(d.to_string());
    CHECK(d.file == "bad.toml");
    CHECK(d.line == line);
    for (const std::string& p : parts) CHECK(d.message.find(p) != std::string::npos);
}

inline const std::string full_example = R"(title = "every key"

[traits]
dormancy = { max = 2.0, levels = 2 }
transfer = { max = 6.0, levels = 4 }

[rates]
birth_max = 5.0
birth_cost_dormancy = 0.25
birth_cost_transfer = 0.125
death = 0.75
competition = 1.5
dormancy_probability = 0.2
transfer = 12.5
transfer_form = "density"
transfer_copies = "transfer_only"
dormant_death = 0.01
resuscitation = 0.5
mutation_exponent = 0.625
mutation_backward = 0.3
competition_counts_dormant = true
migration = 0.07
migration_dormant = 0.002

[[rates.override]]
trait = [2.0, 0.0]
birth = 2.5
death = 1.25
competition = 3.0
dormancy_probability = 0.9

[scale]
K = 1e6

[lattice]
width = 5
height = 4
neighbourhood = 8
boundary = "periodic"

[[habitat]]
name = "open"
symbol = "."
colour = "#d8d8d8"

[[habitat]]
name = "treated"
symbol = "T"
colour = "#aa2020"
capacity = 0.5
stress = 0.25
resuscitation = 2.0
permeability = 0.1

[[inoculum]]
where = "all"
trait = [0.0, 0.0]
exponent = 0.5

[[inoculum]]
where = "habitat:treated"
trait = [2.0, 6.0]
active = 1000
dormant = 20

[[inoculum]]
where = "patch:4,3"
trait = [0.0, 2.0]
active = 7

[[inoculum]]
where = "rect:3,2,1,0"
trait = [2.0, 4.0]
dormant = 5

[[schedule]]
name = "antibiotic pulse"
habitat = "treated"
start = 10.0
end = 12.0
every = 24.0
stress = 3.0
capacity = 0.25

[run]
until = 30.0
time_unit = "plain"
method = "exact-spatial"
sync = 0.02
seed = 42
threads = 3

[output]
every = 0.5
fields_every = 2.0
frames_every = 0.25
frame_scale = 6
habitat_outlines = false
)";

}  // namespace tessera::scenario_test
