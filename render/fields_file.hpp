// Reading fields.h5 back (the layout of src/io/fields_writer.hpp) into FieldSnapshots, for
// `tessera render`: frames from a finished run, no display and no simulation needed. Also
// reads ode_fields.h5, whose counts are float64 (the deterministic model in counts): they
// are rounded to the nearest whole cell for drawing.
#pragma once

#include <cstdint>
#include <string>

#include "render/field_snapshot.hpp"

namespace tessera {

class FieldsFile {
public:
    // Opens `path` read-only and checks its shape against `scenario` (the run's resolved
    // scenario); throws std::runtime_error naming the file and what does not match.
    FieldsFile(const std::string& path, const Scenario& scenario);
    ~FieldsFile();
    FieldsFile(const FieldsFile&) = delete;
    FieldsFile& operator=(const FieldsFile&) = delete;

    std::uint64_t snapshots() const { return snapshots_; }
    // Snapshot `index` (0-based): counts, times, the habitat map stored in the file, and the
    // class conditions in force at that time.
    FieldSnapshot read(std::uint64_t index) const;

private:
    std::string path_;
    Scenario scenario_;
    std::int64_t file_ = -1;  // hid_t
    std::uint64_t snapshots_ = 0;
    bool real_counts_ = false;  // /active and /dormant are float64
};

}  // namespace tessera
