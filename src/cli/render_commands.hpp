// The picture commands: `tessera render` (frames from a finished run's fields.h5),
// `tessera plot` (figures of runs and sweeps) and `tessera view` (the live window). Kept apart from commands.hpp so the render library is
// the only graphics dependency of the command line.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace tessera::cli {

struct RenderOptions {
    std::string run_dir;
    std::string out;
    std::string fields = "fields.h5";  // in run_dir (or a path): ode_fields.h5 draws the deterministic model
    std::string view = "trait";
    std::string video;          // "" = none; otherwise an .mp4 made with ffmpeg
    std::optional<int> scale;   // pixels per patch; default output.frame_scale of the run
    double fps = 10.0;
};

struct ViewOptions {
    std::string scenario;
    std::vector<std::string> sets;
    std::string record;         // directory for recorded frames ("" = tessera-recording when R is pressed)
    std::string script;         // scripted input, for tests and demos
    int frames = 0;             // close after this many drawn frames (0: when the user closes it)
    std::string view = "trait";
    std::string predict;        // "ode": overlay the deterministic model at this K; "" = none
};

struct PlotOptions {
    std::string dir;             // a run's or a sweep's output directory
    std::string out;             // "" = DIR/<what>.png (DIR/regimes.png for a sweep)
    std::string what = "exponents";
    std::string time = "logK";
    std::string traits;          // "x:y,x:y"; "" = every trait that has cells
    std::string size = "1200x750";
    int replicate_lines = 0;
    std::string panels;          // "", "dormancy" or "habitat"
    bool quiet = false;          // no "wrote FILE" line (the demo lists its files itself)
};

int render_command(const RenderOptions& options);
int plot_command(const PlotOptions& options);
int view_command(const ViewOptions& options);

}  // namespace tessera::cli
