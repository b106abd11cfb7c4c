// `tessera predict --model ode` end to end (the built program): on a lattice with two
// habitat classes it writes ode_series.csv, ode_habitat_series.csv and ode_fields.h5 in the
// formats of a run's series.csv, habitat_series.csv and fields.h5 (same headers, same output
// times and trait rows, same datasets and shapes, counts as float64), `tessera render
// --fields ode_fields.h5` draws it, and bad input gets exit code 2. Also the
// exponent_per_patch column (interfaces.md): 1 at carrying capacity everywhere, equal to
// `exponent` on one patch of capacity 1.
#include <catch2/catch.hpp>

#include <hdf5.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "core/engine.hpp"
#include "io/series_writer.hpp"
#include "validation_support.hpp"

namespace fs = std::filesystem;
using namespace tessera;
using Catch::Matchers::Contains;

namespace {

const std::string tool = TESSERA_BINARY;
using clitest::exit_code;
using clitest::slurp;
using clitest::spit;

fs::path scratch() {
    static const clitest::ScratchDir s("tessera-predict-ode-test");
    return s.path();
}

int program(const std::string& args, std::string* err = nullptr) {
    return clitest::run_program(tool, args, scratch(), nullptr, err);
}

std::vector<std::vector<std::string>> csv(const fs::path& p) {
    std::vector<std::vector<std::string>> rows;
    std::istringstream in(slurp(p));
    for (std::string line; std::getline(in, line);) {
        std::vector<std::string> cells;
        std::istringstream l(line);
        for (std::string c; std::getline(l, c, ',');) cells.push_back(c);
        rows.push_back(cells);
    }
    return rows;
}

// A 6 x 4 lattice: open patches, a stressed class of capacity 0.5 and a wall; migration,
// mutation, a stress pulse; every patch but the walls starts at K_p cells of (0,0).
fs::path lattice_scenario() {
    spit(scratch() / "map.txt", "......\n..ss#.\n..ss#.\n......\n");
    spit(scratch() / "lattice.toml",
         "title = \"predict ode test\"\n"
         "[rates]\ntransfer = 1.5\nmigration = 0.2\nmutation_exponent = 0.5\n"
         "[scale]\nK = 1e6\n"
         "[lattice]\nmap = \"map.txt\"\n"
         "[[habitat]]\nname = \"open\"\nsymbol = \".\"\n"
         "[[habitat]]\nname = \"stressed\"\nsymbol = \"s\"\ncapacity = 0.5\nstress = 0.5\n"
         "[[habitat]]\nname = \"wall\"\nsymbol = \"#\"\ncapacity = 0.0\n"
         "[[inoculum]]\nwhere = \"all\"\ntrait = [0.0, 0.0]\nexponent = 1.0\n"
         "[[schedule]]\nhabitat = \"stressed\"\nstart = 0.3\nend = 0.6\nstress = 3.0\n"
         "[run]\nuntil = 1.0\nseed = 3\n"
         "[output]\nevery = 0.1\nfields_every = 0.5\n");
    return scratch() / "lattice.toml";
}

struct Dataset {
    std::vector<hsize_t> dims;
    H5T_class_t type;
};

Dataset dataset(const fs::path& file, const char* name) {
    hid_t f = H5Fopen(file.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
    REQUIRE(f >= 0);
    hid_t set = H5Dopen2(f, name, H5P_DEFAULT);
    REQUIRE(set >= 0);
    hid_t space = H5Dget_space(set), type = H5Dget_type(set);
    Dataset d;
    d.dims.resize(static_cast<std::size_t>(H5Sget_simple_extent_ndims(space)));
    H5Sget_simple_extent_dims(space, d.dims.data(), nullptr);
    d.type = H5Tget_class(type);
    H5Tclose(type);
    H5Sclose(space);
    H5Dclose(set);
    H5Fclose(f);
    return d;
}

}  // namespace

TEST_CASE("predict --model ode writes the run's formats, and render draws ode_fields.h5") {
    const fs::path s = lattice_scenario();
    const fs::path run = scratch() / "run", ode = scratch() / "ode";
    std::string err;
    REQUIRE(program("run '" + s.string() + "' --out '" + run.string() + "' --quiet", &err) == 0);
    INFO(err);
    REQUIRE(program("predict '" + s.string() + "' --out '" + ode.string() + "'", &err) == 0);  // ode: the lattice default
    for (const char* f : {"ode_series.csv", "ode_habitat_series.csv", "ode_fields.h5", "scenario.resolved.toml"}) {
        CHECK(fs::exists(ode / f));
    }
    const auto series = csv(run / "series.csv"), ode_series = csv(ode / "ode_series.csv");
    const auto habitats = csv(run / "habitat_series.csv"), ode_habitats = csv(ode / "ode_habitat_series.csv");
    REQUIRE(!ode_series.empty());
    CHECK(ode_series[0] == series[0]);
    CHECK(ode_habitats[0] == habitats[0]);
    CHECK(series[0].back() == "exponent_per_patch");
    CHECK(habitats[0].back() == "exponent_per_patch");
    // The same output times and trait rows (replicate, t, t_logK, [habitat,] dormancy, transfer).
    REQUIRE(ode_series.size() == series.size());
    REQUIRE(ode_habitats.size() == habitats.size());
    REQUIRE(series.size() == 1 + 11 * 9);
    for (std::size_t r = 1; r < series.size(); ++r) {
        CHECK(std::vector<std::string>(ode_series[r].begin(), ode_series[r].begin() + 5) ==
              std::vector<std::string>(series[r].begin(), series[r].begin() + 5));
    }
    for (std::size_t r = 1; r < habitats.size(); ++r) {
        CHECK(std::vector<std::string>(ode_habitats[r].begin(), ode_habitats[r].begin() + 6) ==
              std::vector<std::string>(habitats[r].begin(), habitats[r].begin() + 6));
    }
    // At t = 0 every habitable patch holds K_p cells of (0,0): P = 18 + 4 * 0.5 = 20, so
    // exponent_per_patch = log(1 + K) / log K for the lattice and each class, and exponent =
    // log(1 + 20 K) / log K.
    const double K = 1e6;
    CHECK(std::stod(series[1][7]) == Approx(std::log1p(20 * K) / std::log(K)).epsilon(1e-12));
    CHECK(std::stod(series[1][8]) == Approx(std::log1p(K) / std::log(K)).epsilon(1e-12));
    CHECK(std::stod(ode_series[1][8]) == Approx(std::log1p(K) / std::log(K)).epsilon(1e-12));
    for (std::size_t c = 0; c < 2; ++c) {
        const auto& row = habitats[1 + 9 * c];
        CHECK(row[3] == (c == 0 ? "open" : "stressed"));
        CHECK(std::stod(row[8]) == Approx(std::log1p(K) / std::log(K)).epsilon(1e-12));
    }
    CHECK(habitats[1 + 18][3] == "wall");
    CHECK(habitats[1 + 18][8] == "0");
    // The run and the model agree on the resident's count within a few / sqrt(K) (Kurtz 1970)
    // at the end: 1e-2 relative is far above the noise and far below a wrong model.
    const std::size_t last = series.size() - 9;
    CHECK(std::stod(ode_series[last][5]) == Approx(std::stod(series[last][5])).epsilon(1e-2));

    // fields.h5 and ode_fields.h5: the same datasets and shapes; counts integer and float64.
    for (const char* name : {"t", "t_logK", "active", "dormant", "traits", "habitat", "habitat_names"}) {
        INFO(name);
        CHECK(dataset(ode / "ode_fields.h5", name).dims == dataset(run / "fields.h5", name).dims);
    }
    CHECK(dataset(run / "fields.h5", "active").dims == std::vector<hsize_t>{3, 4, 6, 9});
    CHECK(dataset(run / "fields.h5", "active").type == H5T_INTEGER);
    CHECK(dataset(ode / "ode_fields.h5", "active").type == H5T_FLOAT);
    CHECK(dataset(ode / "ode_fields.h5", "dormant").type == H5T_FLOAT);

    // render draws it like a run: one frame per snapshot.
    const fs::path frames = scratch() / "ode_frames";
    REQUIRE(program("render '" + ode.string() + "' --fields ode_fields.h5 --out '" + frames.string() + "'", &err) == 0);
    int pngs = 0;
    for (const auto& e : fs::directory_iterator(frames)) pngs += e.path().extension() == ".png" ? 1 : 0;
    CHECK(pngs == 3);
    CHECK(program("render '" + ode.string() + "' --fields nothing.h5 --out '" + frames.string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("nothing.h5") && Contains("--fields"));
}

TEST_CASE("predict --model ode refuses bad input with exit code 2") {
    const fs::path s = lattice_scenario();
    const fs::path out = scratch() / "bad";
    std::string err;
    CHECK(program("predict '" + s.string() + "' --model ode --out '" + out.string() + "' --set rates.transfr=1", &err) == 2);
    CHECK_THAT(err, Contains("rates.transfr"));
    CHECK(program("predict '" + s.string() + "' --model ode --out '" + out.string() + "' --set scale.K=big", &err) == 2);
    CHECK_THAT(err, Contains("scale.K"));
    CHECK(program("predict '" + s.string() + "' --model odd", &err) == 2);
    CHECK_FALSE(fs::exists(out / "ode_series.csv"));
    // An earlier prediction is not written over without --overwrite.
    REQUIRE(program("predict '" + s.string() + "' --model ode --out '" + out.string() + "'", &err) == 0);
    CHECK(program("predict '" + s.string() + "' --model ode --out '" + out.string() + "'", &err) == 2);
    CHECK(program("predict '" + s.string() + "' --model ode --out '" + out.string() + "' --overwrite", &err) == 0);
}

TEST_CASE("exponent_per_patch equals exponent on one patch of capacity 1") {
    Scenario s = validation::one_patch_scenario();
    s.K = 1e5;
    s.inocula = {validation::inoculum(0, 0, 12345)};
    Engine e(s);
    std::string rows;
    append_series_rows(e, rows);
    std::istringstream l(rows.substr(0, rows.find('\n')));
    std::vector<std::string> cells;
    for (std::string c; std::getline(l, c, ',');) cells.push_back(c);
    REQUIRE(cells.size() == 9);
    CHECK(cells[7] == cells[8]);
    CHECK(std::stod(cells[8]) == Approx(std::log1p(12345.0) / std::log(1e5)).epsilon(1e-15));
}
