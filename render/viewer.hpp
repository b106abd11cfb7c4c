// The live window (`tessera view`): the lattice scaled to fit, a side panel (time plain and
// t / ln K, K, method, speed, legend), a live plot of every trait's exponent, and the
// clicked patch in detail. The whole window is composed on the CPU with the same
// rasteriser and legends as recorded frames, then shown with SFML; the simulation runs in
// a worker thread (SimWorker).
#pragma once

#include <string>

#include "core/scenario.hpp"
#include "render/field_view.hpp"

namespace tessera {

struct ViewerOptions {
    std::string record_dir = "tessera-recording";  // where recorded frames go
    bool record_at_start = false;                  // record from the first frame (R still toggles)
    std::string script;                            // see render/viewer_script.hpp
    int frames = 0;                                // close after this many frames; 0 = never
    FieldView view = FieldView::dominant_trait;
    bool predict_ode = false;  // overlay the deterministic model at this K (dotted) in the live plot
};

// The window opens at 1280 x 860 pixels and can be resized, larger or down to this size
// (a smaller size, asked for by a drag, the window manager or the script, stops here).
inline constexpr unsigned viewer_min_width = 800, viewer_min_height = 560;

// Opens the window and runs until it is closed. Returns the exit code (0; 2 for a bad
// script, or when the simulation stopped early because a patch would pass 2^62 cells, which
// the panel shows and stderr gets; 1 when no window can be opened, with a message).
int run_viewer(const Scenario& scenario, const ViewerOptions& options);

}  // namespace tessera
