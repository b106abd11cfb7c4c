#include "render/frame_recorder.hpp"

#include <cstdio>
#include <stdexcept>

#include "render/frame.hpp"

namespace tessera {

std::string frame_file_name(std::uint64_t index) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "frame_%06llu.png", static_cast<unsigned long long>(index));
    return buf;
}

FrameRecorder::FrameRecorder(std::filesystem::path dir, int scale, FieldView view)
    : dir_(std::move(dir)), scale_(scale), view_(view) {
    std::filesystem::create_directories(dir_);
}

void FrameRecorder::observe(const Engine& engine, unsigned kinds) {
    if (!(kinds & frames_output)) return;
    if (!have_snapshot_) {
        snapshot_ = snapshot_of(engine);
        have_snapshot_ = true;
    } else {
        update_snapshot(snapshot_, engine);
    }
    write(snapshot_);
}

const sf::Image& FrameRecorder::write(const FieldSnapshot& snapshot) {
    if (!palette_ || palette_->size() != snapshot.traits()) palette_ = std::make_unique<TraitPalette>(snapshot.grid);
    last_ = compose_frame(snapshot, view_, scale_, *palette_, font_);
    const std::filesystem::path file = dir_ / frame_file_name(next_);
    if (!last_.saveToFile(file.string())) throw std::runtime_error(file.string() + ": cannot write the frame");
    ++next_;
    return last_;
}

}  // namespace tessera
