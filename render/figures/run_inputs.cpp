#include "render/figures/run_inputs.hpp"

#include <cmath>
#include <filesystem>

#include "core/trait_grid.hpp"
#include "io/csv_table.hpp"
#include "io/scenario_loader.hpp"
#include "core/exponent_scale.hpp"

namespace fs = std::filesystem;

namespace tessera {

namespace {

// The trait of a row's dormancy and transfer columns, which must lie on the scenario's grid.
int trait_of(const CsvTable& t, std::size_t row, std::size_t x_col, std::size_t y_col, const TraitGrid& grid) {
    const double x = t.number(row, x_col), y = t.number(row, y_col);
    if (const auto trait = grid.find(x, y)) return *trait;
    throw CsvError(t.where(row, x_col) + "trait (" + t.text(row, x_col) + ", " + t.text(row, y_col) +
                   ") is not on the scenario's trait grid (scenario.resolved.toml [traits])");
}

int habitat_of(const CsvTable& t, std::size_t row, std::size_t col, const Scenario& sc) {
    const std::string& name = t.text(row, col);
    for (std::size_t h = 0; h < sc.habitats.size(); ++h)
        if (sc.habitats[h].name == name) return static_cast<int>(h);
    throw CsvError(t.where(row, col) + "habitat \"" + name + "\" is not a habitat class of the scenario");
}

// series.csv and its relatives; `habitats`: the file has a habitat column.
SeriesFile read_series(const std::string& path, const Scenario& sc, bool habitats) {
    const CsvTable t = CsvTable::read(path);
    std::vector<std::string> need = {"replicate", "t", "t_logK", "dormancy", "transfer", "active", "dormant"};
    if (habitats) need.push_back("habitat");
    t.require(need);
    const auto per_patch = t.find("exponent_per_patch");
    if (!habitats && !per_patch) t.require({"exponent"});
    SeriesFile f;
    f.path = path;
    f.per_patch = per_patch.has_value() || habitats;
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    const std::size_t rep = t.column("replicate"), tc = t.column("t"), sc_col = t.column("t_logK"),
                      xc = t.column("dormancy"), yc = t.column("transfer"), ac = t.column("active"),
                      dc = t.column("dormant");
    const std::size_t ec = per_patch ? *per_patch : habitats ? 0 : t.column("exponent");
    const std::size_t hc = habitats ? t.column("habitat") : 0;
    std::vector<double> class_patches;
    if (habitats && !per_patch)
        for (std::size_t h = 0; h < sc.habitats.size(); ++h)
            class_patches.push_back(capacity_weighted_patches(sc, static_cast<int>(h)));
    f.rows.reserve(t.rows());
    for (std::size_t r = 0; r < t.rows(); ++r) {
        SeriesRow row;
        row.replicate = static_cast<int>(t.whole(r, rep));
        row.t = t.number(r, tc);
        row.t_logK = t.number(r, sc_col);
        row.trait = trait_of(t, r, xc, yc, grid);
        row.active = t.number(r, ac);
        row.dormant = t.number(r, dc);
        if (habitats) row.habitat = habitat_of(t, r, hc, sc);
        if (per_patch || !habitats) {
            row.exponent = t.number(r, ec);
        } else {
            const double p = class_patches[static_cast<std::size_t>(row.habitat)];
            row.exponent = p > 0 ? normalised_exponent(row.active + row.dormant, p, sc.K) : std::nan("");
        }
        f.rows.push_back(row);
    }
    return f;
}

std::vector<EnsembleRow> read_ensemble(const std::string& path, const Scenario& sc, bool& per_patch) {
    const CsvTable t = CsvTable::read(path);
    t.require({"t", "t_logK", "dormancy", "transfer", "replicates", "present", "count_median", "count_q10", "count_q90"});
    per_patch = t.find("exponent_per_patch_median").has_value();
    const std::string e = per_patch ? "exponent_per_patch_" : "exponent_";
    t.require({e + "median", e + "q10", e + "q90"});
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    const std::size_t tc = t.column("t"), sc_col = t.column("t_logK"), xc = t.column("dormancy"),
                      yc = t.column("transfer"), rc = t.column("replicates"), pc = t.column("present"),
                      mc = t.column(e + "median"), lc = t.column(e + "q10"), hc = t.column(e + "q90"),
                      cm = t.column("count_median"), cl = t.column("count_q10"), ch = t.column("count_q90");
    std::vector<EnsembleRow> rows;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        EnsembleRow row;
        row.t = t.number(r, tc);
        row.t_logK = t.number(r, sc_col);
        row.trait = trait_of(t, r, xc, yc, grid);
        row.replicates = static_cast<int>(t.whole(r, rc));
        row.present = t.number(r, pc);
        row.median = t.number(r, mc);
        row.q10 = t.number(r, lc);
        row.q90 = t.number(r, hc);
        row.count_median = t.number(r, cm);
        row.count_q10 = t.number(r, cl);
        row.count_q90 = t.number(r, ch);
        rows.push_back(row);
    }
    return rows;
}

std::vector<LimitRow> read_limit(const std::string& path, const Scenario& sc) {
    const CsvTable t = CsvTable::read(path);
    t.require({"t_logK", "dormancy", "transfer", "exponent"});
    const TraitGrid grid(sc.dormancy_axis, sc.transfer_axis);
    const std::size_t sc_col = t.column("t_logK"), xc = t.column("dormancy"), yc = t.column("transfer"),
                      ec = t.column("exponent");
    std::vector<LimitRow> rows;
    for (std::size_t r = 0; r < t.rows(); ++r) rows.push_back({t.number(r, sc_col), trait_of(t, r, xc, yc, grid), t.number(r, ec)});
    return rows;
}

}  // namespace

bool looks_like_run_directory(const std::string& dir) {
    return fs::exists(fs::path(dir) / "series.csv") || fs::exists(fs::path(dir) / "scenario.resolved.toml");
}

RunInputs read_run_inputs(const std::string& dir, bool with_habitats) {
    RunInputs in;
    in.dir = dir;
    const fs::path d(dir);
    const fs::path resolved = d / "scenario.resolved.toml", series = d / "series.csv";
    if (!fs::is_directory(d)) throw FigureInputError(dir + ": not a directory; expected the output directory of 'tessera run' or 'tessera sweep'");
    if (!fs::exists(series))
        throw FigureInputError(series.string() + ": not found; RUN_DIR must be an output directory of 'tessera run' (series.csv is what the figures draw)");
    if (!fs::exists(resolved))
        throw FigureInputError(resolved.string() + ": not found; the figures take the title, K, traits and schedules from it");
    try {
        in.scenario = load_scenario(resolved.string());
    } catch (const ScenarioError& e) {
        std::string message;
        for (const auto& diag : e.diagnostics()) message += (message.empty() ? "" : "\n") + diag.to_string();
        throw FigureInputError(message.empty() ? resolved.string() + ": cannot be read" : message);
    }
    try {
        in.series = read_series(series.string(), in.scenario, false);
        if (in.series.rows.empty()) throw FigureInputError(series.string() + ": no rows below the header; nothing to draw");
        const fs::path habitat = d / "habitat_series.csv";
        if (with_habitats) {
            if (!fs::exists(habitat)) throw FigureInputError(habitat.string() + ": not found; --what habitats and --panels habitat draw it");
            in.habitat_series = read_series(habitat.string(), in.scenario, true);
        }
        if (const fs::path p = d / "ensemble.csv"; fs::exists(p)) in.ensemble = read_ensemble(p.string(), in.scenario, in.ensemble_per_patch);
        if (const fs::path p = d / "limit_series.csv"; fs::exists(p)) in.limit = read_limit(p.string(), in.scenario);
        if (const fs::path p = d / "ode_series.csv"; fs::exists(p)) in.ode = read_series(p.string(), in.scenario, false);
    } catch (const CsvError& e) {
        throw FigureInputError(e.what());
    }
    return in;
}

}  // namespace tessera
