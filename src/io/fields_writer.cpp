#include "io/fields_writer.hpp"

#include <hdf5.h>

#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <memory>
#include <cstring>
#include <stdexcept>
#include <vector>

#include "version.hpp"

namespace tessera {

namespace {

hid_t make_extendible(hid_t file, const char* name, hid_t type, const std::vector<hsize_t>& item,
                      const std::vector<hsize_t>& chunk_item, bool compress) {
    std::vector<hsize_t> dims{0}, maxdims{H5S_UNLIMITED}, chunk{1};
    for (std::size_t k = 0; k < item.size(); ++k) {
        dims.push_back(item[k]);
        maxdims.push_back(item[k]);
        chunk.push_back(chunk_item[k]);
    }
    if (item.empty()) chunk[0] = 256;  // 1-D time axes: many snapshots per chunk
    hid_t space = H5Screate_simple(static_cast<int>(dims.size()), dims.data(), maxdims.data());
    hid_t props = H5Pcreate(H5P_DATASET_CREATE);
    H5Pset_obj_track_times(props, 0);  // no clock in the file: equal runs give equal bytes
    H5Pset_chunk(props, static_cast<int>(chunk.size()), chunk.data());
    if (compress) {
        H5Pset_shuffle(props);
        H5Pset_deflate(props, 4);
    }
    hid_t set = H5Dcreate2(file, name, type, space, H5P_DEFAULT, props, H5P_DEFAULT);
    H5Pclose(props);
    H5Sclose(space);
    return set;
}

// Appends one item (a scalar or a block of `item` dims) along the first axis.
void append_item(hid_t set, std::uint64_t index, const std::vector<hsize_t>& item, hid_t memtype, const void* data) {
    std::vector<hsize_t> size{index + 1}, start{index}, count{1};
    for (hsize_t d : item) {
        size.push_back(d);
        start.push_back(0);
        count.push_back(d);
    }
    H5Dset_extent(set, size.data());
    hid_t file_space = H5Dget_space(set);
    H5Sselect_hyperslab(file_space, H5S_SELECT_SET, start.data(), nullptr, count.data(), nullptr);
    hid_t mem_space = H5Screate_simple(static_cast<int>(count.size()), count.data(), nullptr);
    H5Dwrite(set, memtype, mem_space, file_space, H5P_DEFAULT, data);
    H5Sclose(mem_space);
    H5Sclose(file_space);
}

void write_attribute(hid_t where, const char* name, hid_t type, const void* value) {
    hid_t space = H5Screate(H5S_SCALAR);
    hid_t attr = H5Acreate2(where, name, type, space, H5P_DEFAULT, H5P_DEFAULT);
    H5Awrite(attr, type, value);
    H5Aclose(attr);
    H5Sclose(space);
}

void write_string_attribute(hid_t where, const char* name, const std::string& value) {
    hid_t type = H5Tcopy(H5T_C_S1);
    H5Tset_size(type, std::max<std::size_t>(1, value.size()));
    write_attribute(where, name, type, value.c_str());
    H5Tclose(type);
}

void write_dataset(hid_t file, const char* name, hid_t type, const std::vector<hsize_t>& dims, const void* data) {
    hid_t space = H5Screate_simple(static_cast<int>(dims.size()), dims.data(), nullptr);
    hid_t props = H5Pcreate(H5P_DATASET_CREATE);
    H5Pset_obj_track_times(props, 0);
    hid_t set = H5Dcreate2(file, name, type, space, H5P_DEFAULT, props, H5P_DEFAULT);
    H5Dwrite(set, type, H5S_ALL, H5S_ALL, H5P_DEFAULT, data);
    H5Dclose(set);
    H5Pclose(props);
    H5Sclose(space);
}

std::vector<hsize_t> lattice_item(const Scenario& s, const TraitGrid& traits) {
    return {static_cast<hsize_t>(s.height), static_cast<hsize_t>(s.width), static_cast<hsize_t>(traits.size())};
}

std::vector<hsize_t> lattice_item(const Engine& e) { return lattice_item(e.scenario(), e.traits()); }

}  // namespace

FieldsWriter::FieldsWriter(const std::string& path, const Engine& engine)
    : FieldsWriter(path, engine.scenario(), engine.traits(), engine.replicate(), FieldCounts::integer) {}

FieldsWriter::FieldsWriter(const std::string& path, const Scenario& s, const TraitGrid& traits,
                           std::uint32_t replicate, FieldCounts counts)
    : path_(path), counts_(counts) {
    H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);  // our own messages, not HDF5's stack dump
    file_ = H5Fcreate(path.c_str(), H5F_ACC_TRUNC, H5P_DEFAULT, H5P_DEFAULT);
    if (file_ < 0) throw std::runtime_error(path + ": cannot create the HDF5 file");

    const std::vector<hsize_t> item = lattice_item(s, traits);
    item_.assign(item.begin(), item.end());
    // Chunks of whole rows, about 1 MiB each, so a reader can fetch a region cheaply.
    const hsize_t row_bytes = item[1] * item[2] * sizeof(std::uint64_t);
    const hsize_t rows = std::clamp<hsize_t>((1u << 20) / std::max<hsize_t>(row_bytes, 1), 1, item[0]);
    const std::vector<hsize_t> chunk{rows, item[1], item[2]};
    t_ = make_extendible(file_, "t", H5T_NATIVE_DOUBLE, {}, {}, false);
    t_logK_ = make_extendible(file_, "t_logK", H5T_NATIVE_DOUBLE, {}, {}, false);
    // Both types are 8 bytes, so the chunks hold the same rows either way.
    const hid_t count_type = counts == FieldCounts::integer ? H5T_STD_U64LE : H5T_IEEE_F64LE;
    active_ = make_extendible(file_, "active", count_type, item, chunk, true);
    dormant_ = make_extendible(file_, "dormant", count_type, item, chunk, true);
    if (t_ < 0 || t_logK_ < 0 || active_ < 0 || dormant_ < 0) {
        throw std::runtime_error(path + ": cannot create the datasets");
    }

    std::vector<double> table;
    for (int i = 0; i < traits.size(); ++i) {
        table.push_back(traits.dormancy(i));
        table.push_back(traits.transfer(i));
    }
    write_dataset(file_, "traits", H5T_NATIVE_DOUBLE, {static_cast<hsize_t>(traits.size()), 2}, table.data());
    write_dataset(file_, "habitat", H5T_NATIVE_UINT16, {item[0], item[1]}, s.habitat_of_patch.data());

    std::size_t longest = 1;
    for (const Habitat& h : s.habitats) longest = std::max(longest, h.name.size());
    std::vector<char> names(longest * s.habitats.size(), '\0');
    for (std::size_t c = 0; c < s.habitats.size(); ++c) {
        std::memcpy(names.data() + c * longest, s.habitats[c].name.data(), s.habitats[c].name.size());
    }
    hid_t name_type = H5Tcopy(H5T_C_S1);
    H5Tset_size(name_type, longest);
    write_dataset(file_, "habitat_names", name_type, {s.habitats.size()}, names.data());
    H5Tclose(name_type);

    write_attribute(file_, "K", H5T_NATIVE_DOUBLE, &s.K);
    write_attribute(file_, "seed", H5T_NATIVE_UINT64, &s.seed);
    write_attribute(file_, "replicate", H5T_NATIVE_UINT32, &replicate);
    write_string_attribute(file_, "version", tessera::version);
    write_string_attribute(file_, "build_id", tessera::build_id);
}

FieldsWriter::~FieldsWriter() {
    for (std::int64_t id : {t_, t_logK_, active_, dormant_}) {
        if (id >= 0) H5Dclose(id);
    }
    if (file_ >= 0) H5Fclose(file_);
}

void FieldsWriter::append(const Engine& engine) {
    // Counts are never negative, so their int64 bits are their uint64 value.
    append(engine.time(), engine.time_logK(), item_, engine.lattice().all_active().data(),
           engine.lattice().all_dormant().data(), H5T_NATIVE_UINT64);
}

void FieldsWriter::append(double t, double t_logK, const std::vector<double>& active, const std::vector<double>& dormant) {
    if (counts_ != FieldCounts::real) throw std::logic_error(path_ + ": real counts given to an integer fields file");
    append(t, t_logK, item_, active.data(), dormant.data(), H5T_NATIVE_DOUBLE);
}

// The one sequence of HDF5 calls per snapshot, shared by a run and a rebuild so that both
// give the same bytes.
void FieldsWriter::append(double t, double t_logK, const std::vector<unsigned long long>& item, const void* active,
                          const void* dormant, std::int64_t memtype) {
    const std::vector<hsize_t> dims(item.begin(), item.end());
    append_item(t_, snapshots_, {}, H5T_NATIVE_DOUBLE, &t);
    append_item(t_logK_, snapshots_, {}, H5T_NATIVE_DOUBLE, &t_logK);
    append_item(active_, snapshots_, dims, memtype, active);
    append_item(dormant_, snapshots_, dims, memtype, dormant);
    ++snapshots_;
    H5Fflush(file_, H5F_SCOPE_LOCAL);
}

namespace {

// Reads snapshot `index` of a [snapshot][...] dataset into `out` (sized for one item).
bool read_item(hid_t set, std::uint64_t index, const std::vector<hsize_t>& item, hid_t memtype, void* out) {
    hid_t file_space = H5Dget_space(set);
    const int rank = H5Sget_simple_extent_ndims(file_space);
    std::vector<hsize_t> dims(static_cast<std::size_t>(std::max(rank, 1)));
    H5Sget_simple_extent_dims(file_space, dims.data(), nullptr);
    bool ok = rank == static_cast<int>(item.size()) + 1 && dims[0] > index;
    for (std::size_t k = 0; ok && k < item.size(); ++k) ok = dims[k + 1] == item[k];
    if (ok) {
        std::vector<hsize_t> start{index}, count{1};
        for (hsize_t d : item) {
            start.push_back(0);
            count.push_back(d);
        }
        H5Sselect_hyperslab(file_space, H5S_SELECT_SET, start.data(), nullptr, count.data(), nullptr);
        hid_t mem_space = H5Screate_simple(static_cast<int>(count.size()), count.data(), nullptr);
        ok = H5Dread(set, memtype, mem_space, file_space, H5P_DEFAULT, out) >= 0;
        H5Sclose(mem_space);
    }
    H5Sclose(file_space);
    return ok;
}

}  // namespace

std::unique_ptr<FieldsWriter> FieldsWriter::rebuild(const std::string& path, const Engine& engine,
                                                    std::uint64_t snapshots) {
    H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
    const std::string fresh = path + ".rebuild";
    auto writer = std::make_unique<FieldsWriter>(fresh, engine);
    if (snapshots > 0) {
        hid_t old = H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
        if (old < 0) {
            writer.reset();
            std::remove(fresh.c_str());
            throw std::runtime_error(path + ": cannot open it to resume (missing, or not a readable HDF5 file)");
        }
        const char* names[4] = {"t", "t_logK", "active", "dormant"};
        hid_t sets[4];
        for (int k = 0; k < 4; ++k) sets[k] = H5Dopen2(old, names[k], H5P_DEFAULT);
        const std::vector<hsize_t> item = lattice_item(engine);
        const std::vector<unsigned long long> item_ull(item.begin(), item.end());
        std::vector<std::uint64_t> active(item[0] * item[1] * item[2]), dormant(active.size());
        std::string problem;
        for (std::uint64_t i = 0; i < snapshots && problem.empty(); ++i) {
            double t = 0.0, t_logK = 0.0;
            bool ok = sets[0] >= 0 && sets[1] >= 0 && sets[2] >= 0 && sets[3] >= 0;
            ok = ok && read_item(sets[0], i, {}, H5T_NATIVE_DOUBLE, &t) &&
                 read_item(sets[1], i, {}, H5T_NATIVE_DOUBLE, &t_logK) &&
                 read_item(sets[2], i, item, H5T_NATIVE_UINT64, active.data()) &&
                 read_item(sets[3], i, item, H5T_NATIVE_UINT64, dormant.data());
            if (!ok) {
                problem = path + ": cannot read snapshot " + std::to_string(i) + " of the " +
                          std::to_string(snapshots) + " the checkpoint counts (the file is damaged or from another run)";
                break;
            }
            writer->append(t, t_logK, item_ull, active.data(), dormant.data(), H5T_NATIVE_UINT64);
        }
        for (hid_t set : sets) {
            if (set >= 0) H5Dclose(set);
        }
        H5Fclose(old);
        if (!problem.empty()) {
            writer.reset();
            std::remove(fresh.c_str());
            throw std::runtime_error(problem);
        }
    }
    // HDF5 keeps writing through its open descriptor, which follows the rename.
    if (std::rename(fresh.c_str(), path.c_str()) != 0) {
        throw std::runtime_error(path + ": cannot replace it with the rebuilt file");
    }
    writer->path_ = path;
    return writer;
}

void FieldsWriter::sync() {
    H5Fflush(file_, H5F_SCOPE_LOCAL);
    void* handle = nullptr;
    if (H5Fget_vfd_handle(file_, H5P_DEFAULT, &handle) >= 0 && handle) ::fsync(*static_cast<int*>(handle));
}

}  // namespace tessera
