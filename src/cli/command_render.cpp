// tessera render RUN_DIR --out DIR [--fields FILE] [--view NAME] [--video FILE.mp4]: the
// frames of a finished run, drawn from its fields.h5 (or, with --fields ode_fields.h5, the
// deterministic model's written by `tessera predict --model ode`) and scenario.resolved.toml
// with the same rasteriser as the recorder and the window. Needs no display.
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <iostream>
#include <memory>
#include <stdexcept>

#include "cli/render_commands.hpp"
#include "cli/scenario_input.hpp"
#include "render/fields_file.hpp"
#include "render/frame_recorder.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

bool ffmpeg_installed() { return std::system("command -v ffmpeg > /dev/null 2>&1") == 0; }

// One shell word, whatever the text holds (single quotes, with ' written as '\'').
std::string shell_quoted(const std::string& text) {
    std::string out = "'";
    for (char c : text) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return out + "'";
}

// Raw RGBA frames on ffmpeg's standard input; H.264 needs even sizes, hence the pad filter.
std::FILE* open_video(const std::string& file, unsigned w, unsigned h, double fps) {
    const std::string command = "ffmpeg -y -loglevel error -f rawvideo -pixel_format rgba -video_size " +
                                std::to_string(w) + "x" + std::to_string(h) + " -framerate " + std::to_string(fps) +
                                " -i - -vf 'pad=ceil(iw/2)*2:ceil(ih/2)*2' -pix_fmt yuv420p -c:v libx264 " +
                                shell_quoted(file);
    return popen(command.c_str(), "w");
}

}  // namespace

int render_command(const RenderOptions& o) {
    const auto view = view_from_name(o.view);
    if (!view) {
        std::cerr << "error: --view " << o.view << ": unknown view; accepted: " << view_names() << "\n";
        return 2;
    }
    const fs::path dir(o.run_dir);
    const fs::path resolved = dir / "scenario.resolved.toml", fields = dir / o.fields;
    if (!fs::exists(resolved)) {
        std::cerr << "error: " << resolved.string() << ": not found; RUN_DIR must be an output directory of 'tessera run'\n";
        return 2;
    }
    if (!fs::exists(fields)) {
        std::cerr << "error: " << fields.string()
                  << (o.fields == "fields.h5"
                          ? ": not found; the run saved no fields (output.fields_every = 0), so there is nothing to draw\n"
                          : ": not found; --fields names a fields file in RUN_DIR (fields.h5 of a run, ode_fields.h5 "
                            "of 'tessera predict --model ode')\n");
        return 2;
    }
    const auto loaded = load_or_report(resolved.string());
    if (!loaded) return 2;
    const Scenario& scenario = *loaded;
    const bool video = !o.video.empty();
    if (video && !ffmpeg_installed()) {
        std::cerr << "error: --video needs ffmpeg, which is not installed (apt-get install ffmpeg); "
                     "run without --video to get the PNG frames\n";
        return 2;
    }
    try {
        const FieldsFile file(fields.string(), scenario);
        FrameRecorder recorder(o.out, o.scale.value_or(scenario.frame_scale), *view);
        std::FILE* pipe = nullptr;
        sf::Vector2u size;
        for (std::uint64_t i = 0; i < file.snapshots(); ++i) {
            const sf::Image& frame = recorder.write(file.read(i));
            if (!video) continue;
            if (!pipe) {
                size = frame.getSize();
                pipe = open_video(o.video, size.x, size.y, o.fps);
                if (!pipe) throw std::runtime_error("cannot start ffmpeg");
            }
            if (frame.getSize() != size) throw std::runtime_error("frame " + std::to_string(i) + " differs in size from the first; cannot make a video");
            std::fwrite(frame.getPixelsPtr(), 4, std::size_t{size.x} * size.y, pipe);
        }
        if (pipe && pclose(pipe) != 0) {
            std::cerr << "error: ffmpeg could not write " << o.video << "\n";
            return 1;
        }
        std::cout << recorder.frames() << " frames written to " << o.out << "/" << (video ? ", video to " + o.video : "")
                  << "\n";
    } catch (const std::runtime_error& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    }
    return 0;
}

}  // namespace tessera::cli
