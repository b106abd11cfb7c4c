// Keeps the newest checkpoint section of every replicate and writes checkpoint.bin (all of
// them, atomically) whenever one replicate hands in a new section. Replicates run in
// parallel at their own pace; each section is self-consistent (state and output positions
// of that replicate at one step boundary), so the file is always a valid place to resume.
#pragma once

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <mutex>
#include <string>
#include <vector>

#include "io/checkpoint.hpp"

namespace tessera::cli {

class CheckpointKeeper {
public:
    CheckpointKeeper(std::filesystem::path file, std::string scenario_text, std::vector<std::uint16_t> habitat_of_patch,
                     std::vector<std::string> sections);

    // Replaces replicate r's section and rewrites the file; throws std::runtime_error
    // naming the file when it cannot be written.
    void update(int replicate, std::string section);
    void write();  // rewrites the file with the sections held

    const std::filesystem::path& file() const { return file_; }

private:
    std::filesystem::path file_;
    std::string scenario_text_;
    std::vector<std::uint16_t> habitat_of_patch_;
    std::vector<std::string> sections_;
    std::mutex mutex_;
};

}  // namespace tessera::cli
