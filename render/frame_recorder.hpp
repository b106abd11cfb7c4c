// The frame recorder: an Observer that writes frames/frame_NNNNNN.png (six digits, from
// 000000, in the order observed) whenever frames are due (output.frames_every). It uses the
// same CPU rasteriser and layout as the window, and needs no display.
#pragma once

#include <filesystem>
#include <string>

#include "core/engine.hpp"
#include "render/field_snapshot.hpp"
#include "render/field_view.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"

namespace tessera {

// "frame_000042.png"
std::string frame_file_name(std::uint64_t index);

class FrameRecorder : public Observer {
public:
    // Creates `dir` if needed. `scale` is pixels per patch (output.frame_scale).
    FrameRecorder(std::filesystem::path dir, int scale, FieldView view = FieldView::dominant_trait);

    void observe(const Engine& engine, unsigned kinds) override;  // a frame when frames_output is due
    // Writes the next frame from a snapshot and returns it; throws std::runtime_error when
    // the PNG cannot be written.
    const sf::Image& write(const FieldSnapshot& snapshot);

    std::uint64_t frames() const { return next_; }
    // Resuming a run: the next frame written is frame_<next_frame>.
    void resume_at(std::uint64_t next_frame) { next_ = next_frame; }
    const std::filesystem::path& directory() const { return dir_; }
    // The view of the frames written from now on (the window's recording follows its V key).
    void set_view(FieldView view) { view_ = view; }

private:
    std::filesystem::path dir_;
    int scale_;
    FieldView view_;
    Typeface font_;
    std::unique_ptr<TraitPalette> palette_;  // made from the first snapshot's trait grid
    FieldSnapshot snapshot_;                 // reused between frames
    bool have_snapshot_ = false;
    sf::Image last_;
    std::uint64_t next_ = 0;
};

}  // namespace tessera
