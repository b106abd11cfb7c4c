// Determinism of map-driven scenarios (validation.md V13): the bundled spatial scenarios,
// loaded from their files (text and PNG maps, walls, schedules, inocula by habitat and by
// rectangle) and shortened with an override, give the same bytes on 1 and 2 threads: the
// series and habitat series text, and the per-patch snapshots written to fields.h5 and
// read back (the datasets, not the file: HDF5 stamps objects with their creation time).
//
// Source: counter-based streams keyed by (seed, replicate, patch) and countered by
// (step, phase) (Salmon et al. 2011, "Parallel random numbers: as easy as 1, 2, 3", SC11).
#include <catch2/catch.hpp>
#include <hdf5.h>
#include <tbb/global_control.h>

#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "core/engine.hpp"
#include "io/fields_writer.hpp"
#include "io/scenario_loader.hpp"
#include "io/series_writer.hpp"

using namespace tessera;
namespace fs = std::filesystem;

namespace {

struct Outputs : Observer {
    std::string series, habitat_series;
    std::unique_ptr<FieldsWriter> fields;
    void observe(const Engine& e, unsigned kinds) override {
        if (kinds & series_output) {
            append_series_rows(e, series);
            append_habitat_series_rows(e, habitat_series);
        }
        if ((kinds & fields_output) && fields) fields->append(e);
    }
};

// The raw bytes of a dataset of fields.h5.
std::vector<unsigned char> dataset_bytes(const std::string& file, const char* name) {
    const hid_t f = H5Fopen(file.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
    REQUIRE(f >= 0);
    const hid_t d = H5Dopen2(f, name, H5P_DEFAULT);
    REQUIRE(d >= 0);
    const hid_t type = H5Dget_type(d);
    const hid_t space = H5Dget_space(d);
    const auto n = static_cast<std::size_t>(H5Sget_simple_extent_npoints(space));
    std::vector<unsigned char> bytes(n * H5Tget_size(type));
    if (!bytes.empty()) REQUIRE(H5Dread(d, type, H5S_ALL, H5S_ALL, H5P_DEFAULT, bytes.data()) >= 0);
    H5Sclose(space);
    H5Tclose(type);
    H5Dclose(d);
    H5Fclose(f);
    return bytes;
}

struct Run {
    std::string series, habitat_series;
    std::vector<std::vector<unsigned char>> fields;  // /t, /active, /dormant, /habitat
    std::uint64_t snapshots = 0;
};

Run run_with_threads(const Scenario& s, int threads, const std::string& tag) {
    const fs::path file = fs::temp_directory_path() / ("tessera_map_determinism_" + tag + ".h5");
    Run out;
    {
        tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
        Engine e(s);
        Outputs o;
        o.fields = std::make_unique<FieldsWriter>(file.string(), e);
        e.run(o);
        out.series = o.series;
        out.habitat_series = o.habitat_series;
        out.snapshots = o.fields->snapshots();
    }  // the writer closes the file here
    for (const char* name : {"/t", "/active", "/dormant", "/habitat"}) out.fields.push_back(dataset_bytes(file.string(), name));
    fs::remove(file);
    return out;
}

void check_same_bytes(const std::string& map_dir, const std::vector<std::string>& overrides) {
    const std::string path = std::string(TESSERA_SOURCE_DIR) + "/maps/" + map_dir + "/scenario.toml";
    INFO(path);
    const Scenario s = load_scenario(path, overrides);
    REQUIRE(s.width * s.height > 1);
    const Run one = run_with_threads(s, 1, map_dir + "_1");
    const Run two = run_with_threads(s, 2, map_dir + "_2");
    REQUIRE(one.series.size() > 1000);
    REQUIRE(one.snapshots >= 2);
    CHECK(one.series == two.series);
    CHECK(one.habitat_series == two.habitat_series);
    REQUIRE(one.fields.size() == two.fields.size());
    for (std::size_t i = 0; i < one.fields.size(); ++i) CHECK(one.fields[i] == two.fields[i]);
}

}  // namespace

TEST_CASE("the tube-wall text-map scenario gives the same bytes on 1 and 2 threads", "[V13][maps]") {
    check_same_bytes("tube-wall", {"run.until=0.5"});
}

TEST_CASE("the soil-crumb text-map scenario gives the same bytes on 1 and 2 threads", "[V13][maps]") {
    check_same_bytes("soil-crumb", {"run.until=0.5", "output.fields_every=0.25"});
}

TEST_CASE("the wound-bed PNG-map scenario gives the same bytes on 1 and 2 threads", "[V13][maps]") {
    check_same_bytes("wound-bed", {"run.until=0.5", "output.fields_every=0.25"});
}
