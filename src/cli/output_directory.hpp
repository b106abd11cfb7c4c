// Output directories shared by every command that writes one (run, predict, sweep): created
// and proven writable before any work starts, and never silently written over.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

namespace tessera::cli {

// True when `dir` already holds the outputs of a command (any of `markers`, e.g. series.csv,
// scenario.resolved.toml, checkpoint.bin).
bool holds_outputs(const std::filesystem::path& dir, const std::vector<std::string>& markers);

// Creates `dir` and proves it writable. Refuses (message on stderr, false) a path that is not
// a directory, or one that holds outputs (see holds_outputs) unless `overwrite`. Removes an
// old checkpoint.bin, so an earlier run can never be resumed over new outputs.
bool prepare_directory(const std::filesystem::path& dir, bool overwrite,
                       const std::vector<std::string>& markers = {"series.csv", "scenario.resolved.toml",
                                                                  "checkpoint.bin"});

// Writes `text` to `file` (binary); false when it could not be written whole.
bool write_text(const std::filesystem::path& file, const std::string& text);

}  // namespace tessera::cli
