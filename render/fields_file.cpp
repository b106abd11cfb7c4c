#include "render/fields_file.hpp"

#include <hdf5.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <utility>
#include <vector>

#include "core/habitat_timeline.hpp"

namespace tessera {

namespace {

std::vector<hsize_t> dims_of(hid_t set) {
    hid_t space = H5Dget_space(set);
    const int rank = H5Sget_simple_extent_ndims(space);
    std::vector<hsize_t> dims(static_cast<std::size_t>(std::max(rank, 0)));
    H5Sget_simple_extent_dims(space, dims.data(), nullptr);
    H5Sclose(space);
    return dims;
}

// Reads item `index` of an extendible dataset (first axis = snapshot) into `out`.
void read_item(hid_t file, const char* name, std::uint64_t index, hid_t memtype, void* out, const std::string& path) {
    hid_t set = H5Dopen2(file, name, H5P_DEFAULT);
    if (set < 0) throw std::runtime_error(path + ": no dataset /" + name);
    std::vector<hsize_t> dims = dims_of(set);
    std::vector<hsize_t> start(dims.size(), 0), count = dims;
    start[0] = index;
    count[0] = 1;
    hid_t file_space = H5Dget_space(set);
    H5Sselect_hyperslab(file_space, H5S_SELECT_SET, start.data(), nullptr, count.data(), nullptr);
    hid_t mem_space = H5Screate_simple(static_cast<int>(count.size()), count.data(), nullptr);
    const herr_t status = H5Dread(set, memtype, mem_space, file_space, H5P_DEFAULT, out);
    H5Sclose(mem_space);
    H5Sclose(file_space);
    H5Dclose(set);
    if (status < 0) throw std::runtime_error(path + ": cannot read /" + name);
}

}  // namespace

FieldsFile::FieldsFile(const std::string& path, const Scenario& scenario) : path_(path), scenario_(scenario) {
    H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
    file_ = H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
    if (file_ < 0) throw std::runtime_error(path + ": cannot open (is it a tessera fields.h5?)");

    hid_t active = H5Dopen2(file_, "active", H5P_DEFAULT);
    if (active < 0) throw std::runtime_error(path + ": no dataset /active");
    const std::vector<hsize_t> dims = dims_of(active);
    const hid_t type = H5Dget_type(active);
    real_counts_ = H5Tget_class(type) == H5T_FLOAT;
    H5Tclose(type);
    H5Dclose(active);
    const TraitGrid grid(scenario.dormancy_axis, scenario.transfer_axis);
    if (dims.size() != 4 || dims[1] != static_cast<hsize_t>(scenario.height) ||
        dims[2] != static_cast<hsize_t>(scenario.width) || dims[3] != static_cast<hsize_t>(grid.size())) {
        throw std::runtime_error(path + ": /active is not [snapshot][" + std::to_string(scenario.height) + "][" +
                                 std::to_string(scenario.width) + "][" + std::to_string(grid.size()) +
                                 "] as the resolved scenario says");
    }
    snapshots_ = dims[0];

    // The map stored with the run is the one that was used; prefer it to re-reading the map file.
    hid_t habitat = H5Dopen2(file_, "habitat", H5P_DEFAULT);
    if (habitat >= 0) {
        scenario_.habitat_of_patch.assign(static_cast<std::size_t>(scenario.width) * scenario.height, 0);
        H5Dread(habitat, H5T_NATIVE_UINT16, H5S_ALL, H5S_ALL, H5P_DEFAULT, scenario_.habitat_of_patch.data());
        H5Dclose(habitat);
    }
    if (scenario_.habitats.empty()) scenario_.habitats.push_back(Habitat{});
    if (scenario_.habitat_of_patch.size() != static_cast<std::size_t>(scenario.width) * scenario.height) {
        scenario_.habitat_of_patch.assign(static_cast<std::size_t>(scenario.width) * scenario.height, 0);
    }
}

FieldsFile::~FieldsFile() {
    if (file_ >= 0) H5Fclose(file_);
}

FieldSnapshot FieldsFile::read(std::uint64_t index) const {
    if (index >= snapshots_) throw std::out_of_range(path_ + ": no snapshot " + std::to_string(index));
    double t = 0.0, t_logK = 0.0;
    read_item(file_, "t", index, H5T_NATIVE_DOUBLE, &t, path_);
    read_item(file_, "t_logK", index, H5T_NATIVE_DOUBLE, &t_logK, path_);
    FieldSnapshot s = make_snapshot(scenario_, t);
    s.t_logK = t_logK;
    if (real_counts_) {
        // The deterministic model's counts: the nearest whole cell, within what a patch holds.
        std::vector<double> counts(s.active.size());
        for (auto [name, into] : {std::pair{"active", &s.active}, std::pair{"dormant", &s.dormant}}) {
            read_item(file_, name, index, H5T_NATIVE_DOUBLE, counts.data(), path_);
            for (std::size_t k = 0; k < counts.size(); ++k) {
                const double c = std::isfinite(counts[k]) ? std::clamp(counts[k], 0.0, 4.0e18) : 0.0;
                (*into)[k] = static_cast<std::int64_t>(std::llround(c));
            }
        }
        return s;
    }
    // Counts are stored as uint64 and are far below 2^63, so int64 reads them exactly.
    read_item(file_, "active", index, H5T_NATIVE_INT64, s.active.data(), path_);
    read_item(file_, "dormant", index, H5T_NATIVE_INT64, s.dormant.data(), path_);
    return s;
}

}  // namespace tessera
