#include "cli/checkpoint_keeper.hpp"

namespace tessera::cli {

CheckpointKeeper::CheckpointKeeper(std::filesystem::path file, std::string scenario_text,
                                   std::vector<std::uint16_t> habitat_of_patch, std::vector<std::string> sections)
    : file_(std::move(file)),
      scenario_text_(std::move(scenario_text)),
      habitat_of_patch_(std::move(habitat_of_patch)),
      sections_(std::move(sections)) {}

void CheckpointKeeper::update(int replicate, std::string section) {
    std::lock_guard lock(mutex_);
    sections_[static_cast<std::size_t>(replicate)] = std::move(section);
    write_file_atomically(file_, encode_checkpoint(scenario_text_, habitat_of_patch_, sections_));
}

void CheckpointKeeper::write() {
    std::lock_guard lock(mutex_);
    write_file_atomically(file_, encode_checkpoint(scenario_text_, habitat_of_patch_, sections_));
}

}  // namespace tessera::cli
