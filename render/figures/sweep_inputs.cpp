#include "render/figures/sweep_inputs.hpp"

#include <filesystem>
#include <set>

#include "io/csv_table.hpp"
#include "io/scenario_loader.hpp"
#include "render/figures/regime_palette.hpp"

namespace fs = std::filesystem;

namespace tessera {

namespace {

void read_points(const std::string& path, SweepInputs& in) {
    const CsvTable t = CsvTable::read(path);
    if (t.header().empty() || t.header().front() != "point")
        throw CsvError(path + ":1: the first column must be \"point\", then one column per varied key");
    for (std::size_t c = 1; c < t.header().size(); ++c) in.keys.push_back(t.header()[c]);
    if (in.keys.empty() || in.keys.size() > 2)
        throw CsvError(path + ":1: " + std::to_string(in.keys.size()) +
                       " varied keys; a regime map shows one key (a strip) or two (a heatmap)");
    std::set<int> seen;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        const int id = static_cast<int>(t.whole(r, 0));
        if (!seen.insert(id).second) throw CsvError(t.where(r, 0) + "point " + t.text(r, 0) + " is listed twice");
        in.points.push_back(id);
        std::vector<double> v;
        for (std::size_t c = 1; c < t.header().size(); ++c) v.push_back(t.number(r, c));
        in.values.push_back(std::move(v));
    }
    if (in.points.size() < 2)
        throw CsvError(path + ": " + std::to_string(in.points.size()) +
                       " point(s); a regime map needs a sweep of at least two points (tessera sweep --vary KEY=FROM:TO:N with N >= 2)");
}

void read_outcomes(const std::string& path, SweepInputs& in) {
    const CsvTable t = CsvTable::read(path);
    t.require({"point", "source", "replicate", "regime", "residents"});
    const std::size_t pc = t.column("point"), sc = t.column("source"), rc = t.column("replicate"), gc = t.column("regime"),
                      ec = t.column("residents");
    const std::set<int> known(in.points.begin(), in.points.end());
    for (std::size_t r = 0; r < t.rows(); ++r) {
        SweepOutcome o;
        o.point = static_cast<int>(t.whole(r, pc));
        if (!known.count(o.point)) throw CsvError(t.where(r, pc) + "point " + t.text(r, pc) + " is not in points.csv");
        o.source = t.text(r, sc);
        if (o.source != "limit" && o.source != "run") throw CsvError(t.where(r, sc) + "\"" + o.source + "\"; expected limit or run");
        o.replicate = static_cast<int>(t.whole(r, rc));
        o.regime = t.text(r, gc);
        if (!regime_colour(o.regime))
            throw CsvError(t.where(r, gc) + "\"" + o.regime + "\"; expected extinct, resident, coexistence or cycling");
        o.residents = t.text(r, ec);
        in.outcomes.push_back(std::move(o));
    }
    if (in.outcomes.empty()) throw CsvError(path + ": no rows below the header; nothing to draw");
}

void read_summary(const std::string& path, SweepInputs& in) {
    const CsvTable t = CsvTable::read(path);
    t.require({"point", "source", "replicates", "kind", "name", "fraction"});
    const std::size_t pc = t.column("point"), sc = t.column("source"), nc = t.column("replicates"), kc = t.column("kind"),
                      mc = t.column("name"), fc = t.column("fraction");
    for (std::size_t r = 0; r < t.rows(); ++r) {
        SweepSummaryRow s;
        s.point = static_cast<int>(t.whole(r, pc));
        s.source = t.text(r, sc);
        s.replicates = static_cast<int>(t.whole(r, nc));
        s.kind = t.text(r, kc);
        s.name = t.text(r, mc);
        s.fraction = t.number(r, fc);
        if (s.fraction < 0 || s.fraction > 1) throw CsvError(t.where(r, fc) + t.text(r, fc) + " is not a fraction from 0 to 1");
        if (s.kind == "regime" && !regime_colour(s.name))
            throw CsvError(t.where(r, mc) + "\"" + s.name + "\"; expected extinct, resident, coexistence or cycling");
        in.summary.push_back(std::move(s));
    }
}

}  // namespace

bool looks_like_sweep_directory(const std::string& dir) {
    return fs::exists(fs::path(dir) / "points.csv") && fs::exists(fs::path(dir) / "outcomes.csv");
}

SweepInputs read_sweep_inputs(const std::string& dir) {
    SweepInputs in;
    in.dir = dir;
    const fs::path d(dir);
    try {
        read_points((d / "points.csv").string(), in);
        read_outcomes((d / "outcomes.csv").string(), in);
        if (fs::exists(d / "summary.csv")) read_summary((d / "summary.csv").string(), in);
    } catch (const CsvError& e) {
        throw FigureInputError(e.what());
    }
    // The title only; a sweep's resolved scenario is optional for the map.
    if (const fs::path resolved = d / "scenario.resolved.toml"; fs::exists(resolved)) {
        try {
            in.title = load_scenario(resolved.string()).title;
        } catch (const ScenarioError&) {
        }
    }
    return in;
}

}  // namespace tessera
