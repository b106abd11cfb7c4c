// Inputs of tessera plot: the CSV reader's messages, and which exponent a figure shows
// (exponent_per_patch when the file has it, the lattice total otherwise, computed per
// habitat class when habitat_series.csv lacks the column), with the words that say so.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include "io/csv_table.hpp"
#include "io/scenario_writer.hpp"
#include "render/figures/run_figure.hpp"
#include "render/figures/run_inputs.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

// A 2 x 1 lattice (one trait): patch 0 of class "open" (capacity 1), patch 1 of class
// "half" (capacity 0.5), so P = 1.5 for the lattice, 1 and 0.5 per class; K = 100.
fs::path lattice_run(const std::string& name, bool per_patch_column) {
    const fs::path dir = fs::temp_directory_path() / ("tessera_figure_inputs_" + name);
    fs::remove_all(dir);
    fs::create_directories(dir);
    Scenario sc;
    sc.title = "constructed lattice";
    sc.K = 100;
    sc.width = 2;
    sc.dormancy_axis = {0.0, 1};
    sc.transfer_axis = {0.0, 1};
    Habitat half;
    half.name = "half";
    half.symbol = "h";
    half.capacity = 0.5;
    sc.habitats = {Habitat{}, half};
    sc.habitat_of_patch = {0, 1};
    // The classes of the patches reach the resolved scenario through its map file.
    std::ofstream(dir / "map.txt") << ".h\n";
    sc.map = (dir / "map.txt").string();
    sc.map_path = sc.map;
    sc.until = 2.0;
    std::ofstream(dir / "scenario.resolved.toml") << resolved_scenario_toml(sc);
    // 150 cells in all: 100 on the open patch, 50 on the half one (both full).
    const double total = std::log1p(150.0) / std::log(100.0), per_patch = std::log1p(100.0) / std::log(100.0);
    std::ofstream s(dir / "series.csv");
    s << "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent" << (per_patch_column ? ",exponent_per_patch" : "") << "\n";
    for (int k = 0; k <= 2; ++k) {
        s << "0," << k * std::log(100.0) << "," << k << ",0,0,150,0," << total;
        if (per_patch_column) s << "," << per_patch;
        s << "\n";
    }
    std::ofstream h(dir / "habitat_series.csv");
    h << "replicate,t,t_logK,habitat,dormancy,transfer,active,dormant\n";
    for (int k = 0; k <= 2; ++k) {
        h << "0," << k * std::log(100.0) << "," << k << ",open,0,0,100,0\n";
        h << "0," << k * std::log(100.0) << "," << k << ",half,0,0,50,0\n";
    }
    return dir;
}

}  // namespace

TEST_CASE("a lattice figure shows exponent_per_patch when the file has it and says so") {
    const RunInputs in = read_run_inputs(lattice_run("per_patch", true).string(), false);
    CHECK(in.series.per_patch);
    CHECK(in.series.rows.at(0).exponent == Approx(std::log1p(100.0) / std::log(100.0)));
    const Figure f = build_run_figure(in, {});
    CHECK(f.y_label.find("per patch") != std::string::npos);
    CHECK(f.subtitle.find("capacity-weighted") != std::string::npos);
}

TEST_CASE("without the column it shows the lattice total and says so") {
    const RunInputs in = read_run_inputs(lattice_run("total", false).string(), false);
    CHECK_FALSE(in.series.per_patch);
    CHECK(in.series.rows.at(0).exponent == Approx(std::log1p(150.0) / std::log(100.0)));
    const Figure f = build_run_figure(in, {});
    CHECK(f.y_label.find("per patch") == std::string::npos);
    CHECK(f.subtitle.find("N = lattice total") != std::string::npos);
}

TEST_CASE("habitat panels compute the per-patch exponent of each class from its counts") {
    const RunInputs in = read_run_inputs(lattice_run("habitats", false).string(), true);
    REQUIRE(in.habitat_series);
    // Both classes are full: 100 cells on P = 1 and 50 cells on P = 0.5 are both at 1.
    for (const auto& r : in.habitat_series->rows) CHECK(r.exponent == Approx(std::log1p(100.0) / std::log(100.0)));
    RunFigureOptions o;
    o.what = PlotQuantity::habitats;
    const Figure f = build_run_figure(in, o);
    REQUIRE(f.panels.size() == 2);
    CHECK(f.panels[1].title == "habitat half");
}

TEST_CASE("the CSV reader names file, line and column of a bad value") {
    const CsvTable t = CsvTable::parse("a,b\n1,2\n\n3,x\n", "in.csv");
    CHECK(t.rows() == 2);
    CHECK(t.number(0, 1) == 2.0);
    CHECK(t.line(1) == 4);
    CHECK_THROWS_WITH(t.number(1, 1), "in.csv:4: column b: \"x\" is not a number");
    CHECK_THROWS_WITH(CsvTable::parse("a,b\n1\n", "in.csv"), "in.csv:2: 1 fields; the header has 2 columns");
    CHECK_THROWS_WITH(t.require({"a", "c"}), "in.csv:1: missing column c; the header is a,b");
}

