// fields.h5: per-patch snapshots, written as the run goes (each snapshot is flushed, so a
// long run can be opened while it runs). Layout (interfaces.md):
//   /t, /t_logK            [snapshot]                         float64
//   /active, /dormant      [snapshot][row][col][trait]        uint64, chunked, deflate
//                          (float64 for the deterministic model's real counts, ode_fields.h5)
//   /traits                [trait][2] (dormancy, transfer)    float64
//   /habitat               [row][col] class index             uint16
//   /habitat_names         [class]                            fixed-length strings
//   root attributes: K, seed, replicate, version, build_id
#pragma once

#include <cstdint>
#include <memory>
#include <vector>
#include <string>

#include "core/engine.hpp"

namespace tessera {

// How counts are stored: a run's integers, or the deterministic model's real numbers.
enum class FieldCounts { integer, real };

class FieldsWriter {
public:
    // Creates (truncates) `path` and writes the static tables. Throws std::runtime_error
    // with the file name when HDF5 cannot create it.
    FieldsWriter(const std::string& path, const Engine& engine);
    // The same for any source of snapshots; `scenario` complete (habitats, map).
    FieldsWriter(const std::string& path, const Scenario& scenario, const TraitGrid& traits, std::uint32_t replicate,
                 FieldCounts counts);
    ~FieldsWriter();
    FieldsWriter(const FieldsWriter&) = delete;
    FieldsWriter& operator=(const FieldsWriter&) = delete;

    void append(const Engine& engine);  // one snapshot of the current state
    // One snapshot of real counts, [patch][trait] (a writer made with FieldCounts::real).
    void append(double t, double t_logK, const std::vector<double>& active, const std::vector<double>& dormant);
    std::uint64_t snapshots() const { return snapshots_; }

    // Resuming a run: rebuilds `path` from its own first `snapshots` snapshots into a fresh
    // file made by the same sequence of HDF5 calls as the run that wrote them (so the bytes
    // equal an uninterrupted run's), puts it in place of `path` and continues from there.
    // Throws std::runtime_error naming the file when it cannot be read or holds fewer.
    static std::unique_ptr<FieldsWriter> rebuild(const std::string& path, const Engine& engine,
                                                 std::uint64_t snapshots);

    // Flushes and fsyncs the file (before a checkpoint names its snapshot count).
    void sync();

private:
    void append(double t, double t_logK, const std::vector<unsigned long long>& item, const void* active,
                const void* dormant, std::int64_t memtype);

    std::string path_;
    std::int64_t file_ = -1;  // hid_t
    std::int64_t t_ = -1, t_logK_ = -1, active_ = -1, dormant_ = -1;
    std::uint64_t snapshots_ = 0;
    FieldCounts counts_ = FieldCounts::integer;
    std::vector<unsigned long long> item_;  // [row][col][trait]
};

}  // namespace tessera
