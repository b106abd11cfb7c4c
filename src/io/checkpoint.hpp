// checkpoint.bin: what `tessera resume` needs to continue a run bit for bit. One file per run
// directory covering every replicate; each replicate's section is the state and the output
// positions of that replicate at the same step boundary (replicates run at their own pace,
// so sections may be of different times). Layout (docs/formats.md), all little-endian:
//
//   "TESSCKPT"  u32 format version  u32 0  u64 payload length  payload  u64 FNV-1a-64 of all before
//
// The payload holds the program version and build id, the resolved scenario text, the
// habitat map as used, and per replicate: step number, time (bits of the double), counts,
// per-patch event tallies, lost and migrant totals, the habitat conditions in force and the
// output positions. A file is checked whole (size, checksum, every length) before anything
// is used, so a bad file is refused, never half-loaded.
#pragma once

#include <cstdint>
#include <filesystem>
#include <stdexcept>
#include <string>
#include <vector>

#include "core/engine.hpp"

namespace tessera {

// Raised when the layout changes; a file of another version is refused with both numbers.
inline constexpr std::uint32_t checkpoint_format_version = 1;

// How much of each output a replicate had written (and flushed) at its checkpoint.
struct OutputPositions {
    std::uint64_t series_bytes = 0;          // its series file: series.csv, or its .part file
    std::uint64_t habitat_series_bytes = 0;  // the same for habitat_series.csv
    std::uint64_t snapshots = 0;             // snapshots in its fields file
    std::uint64_t frames = 0;                // frames/frame_NNNNNN.png written (replicate 0)
};

struct ReplicateCheckpoint {
    enum class Stage : std::uint8_t {
        not_started = 0,  // resumes from the start (no state saved; outputs cut to their headers)
        running = 1,      // `state` is a step boundary with every output due up to it written
        finished = 2,     // reached run.until and wrote its final outputs
    };
    std::uint32_t replicate = 0;
    Stage stage = Stage::not_started;
    Engine::State state;  // empty unless running or finished
    OutputPositions outputs;
};

struct Checkpoint {
    std::string program_version;
    std::string build_id;
    std::string scenario_text;                    // scenario.resolved.toml as used
    std::vector<std::uint16_t> habitat_of_patch;  // the map as used (a changed map file is refused)
    std::vector<ReplicateCheckpoint> replicates;  // in replicate order, 0..R-1
};

// A checkpoint that cannot be used; the message names the file and what is wrong.
class CheckpointError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// One replicate's section of the payload (kept encoded while other replicates run on).
std::string encode_replicate(const ReplicateCheckpoint& replicate);

// The whole file from the header fields and every replicate's encoded section.
std::string encode_checkpoint(const std::string& scenario_text, const std::vector<std::uint16_t>& habitat_of_patch,
                              const std::vector<std::string>& sections);

// Writes `bytes` to `path` atomically: a temporary file beside it, written, fsync'ed and
// renamed over `path`, then the directory fsync'ed. A crash leaves the old file or the new
// one, never a mixture. Throws std::runtime_error naming the file.
void write_file_atomically(const std::filesystem::path& path, const std::string& bytes);

// Reads and checks a whole checkpoint; throws CheckpointError (file name and the problem).
Checkpoint read_checkpoint(const std::filesystem::path& path);
Checkpoint decode_checkpoint(const std::string& bytes, const std::string& name);

}  // namespace tessera
