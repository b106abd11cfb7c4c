// What a sweep directory records about itself, so that `tessera resume DIR` and
// `tessera sweep --merge` need nothing but the directory (docs/formats.md "Sweeps"):
//
//   sweep.manifest  the command as given (scenario file, --set, --vary, --with, replicates,
//                   seed, shard, classification settings) and a checksum of every point's
//                   resolved scenario, so a resume refuses a scenario file changed since;
//   sweep.state     how many of the shard's points are written, and the byte lengths of the
//                   three growing tables at that moment; replaced (by rename) after every
//                   point, so a killed sweep resumes from its last whole point.
//
// Both are `key=value` lines; lines starting with '#' are comments.
#pragma once

#include <cstdint>
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

namespace tessera::cli {

struct SweepManifest {
    std::string scenario;  // absolute path of the scenario file
    std::vector<std::string> sets;
    std::vector<std::string> vary;
    bool with_limit = false;
    bool with_run = true;
    int replicates = 10;
    std::optional<std::uint64_t> seed;
    int shard_index = 1;  // 1 .. shard_count
    int shard_count = 1;
    bool keep_series = false;
    double eps = 0.1;
    double final_window = 0.25;
    std::size_t points = 0;      // of the whole grid
    std::uint64_t checksum = 0;  // FNV-1a over the points' resolved scenarios, in point order

    std::string with_text() const { return with_limit && with_run ? "both" : with_limit ? "limit" : "run"; }
    std::string to_text() const;
    // Equal in everything but the shard index (shards of one sweep).
    bool same_sweep(const SweepManifest& other) const;
};

// Throws std::runtime_error naming the file and line when it is not a manifest.
SweepManifest read_manifest(const std::filesystem::path& file);
bool write_manifest(const std::filesystem::path& file, const SweepManifest& manifest);

inline const char* manifest_name = "sweep.manifest";
inline const char* state_name = "sweep.state";

struct SweepState {
    std::size_t points_done = 0;  // of this shard's points, in order
    std::uint64_t outcomes_bytes = 0, final_exponents_bytes = 0, summary_bytes = 0;
};

SweepState read_state(const std::filesystem::path& file);  // throws std::runtime_error
// Written beside and renamed over: a killed process leaves the old or the new state. With
// `sync` the new one is fsync'ed first, so that it also survives a power cut (the caller
// fsyncs the tables it describes before).
bool write_state(const std::filesystem::path& file, const SweepState& state, bool sync = true);

}  // namespace tessera::cli
