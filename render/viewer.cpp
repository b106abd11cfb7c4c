#include "render/viewer.hpp"

#include <SFML/Graphics.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <iostream>
#include <optional>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"
#include "render/frame.hpp"
#include "render/frame_recorder.hpp"
#include "render/legend.hpp"
#include "render/patch_inspector.hpp"
#include "render/rasteriser.hpp"
#include "render/sim_worker.hpp"
#include "render/trait_plot.hpp"
#include "render/typeface.hpp"
#include "render/viewer_predictions.hpp"
#include "render/viewer_script.hpp"

namespace tessera {

namespace {

constexpr int panel_w = 300;
constexpr int bottom_h = 230;
constexpr int pad = 10;
// The window opens at this size and can be made larger or smaller, down to the smallest
// size at which the side panel still holds the title lines and the trait legend, the plot
// and the patch inspector still fit below the lattice, and the help box fits inside.
constexpr unsigned start_w = 1280, start_h = 860;
constexpr unsigned min_w = viewer_min_width, min_h = viewer_min_height;
// The patch inspector needs this much width for its labels, a bar and its numbers; the
// plot beside it gets the rest.
constexpr int inspector_min_w = 300;

const char* const help_lines[] = {
    "Keys",
    "Space        pause / run",
    "S or .       one output interval (when paused)",
    "+ / -        faster / slower",
    "V            next view (trait, dormant, transfer, exponent, habitat, stress)",
    "Click        show a patch's counts per trait",
    "R            start / stop recording frames (on from the start with --record)",
    "P            screenshot (screenshot_NNN.png)",
    "N            restart with a new seed",
    "H or F1      this help",
    "Q or Esc     quit",
    "",
    "Reading the trait view",
    "Colour       the trait with most cells in the patch (grid in the legend)",
    "Brightness   how full: bright = K_p cells, dim = a few, near black = none",
    "Hatched      wall: no cells live or pass there",
    "",
    "tessera is a model for research, not guidance for",
    "clinical or environmental decisions.",
};

std::string format(const char* fmt, double v) {
    char buf[96];
    std::snprintf(buf, sizeof buf, fmt, v);
    return buf;
}

// Where the lattice sits in the window and at what scale.
struct LatticePlace {
    int x = 0, y = 0, scale = 1;
};

LatticePlace place_lattice(const FieldSnapshot& s, unsigned W, unsigned H) {
    const int area_w = std::max(static_cast<int>(W) - panel_w - 2 * pad, 1);
    const int area_h = std::max(static_cast<int>(H) - bottom_h - 2 * pad, 1);
    LatticePlace p;
    p.scale = std::max(1, std::min(area_w / std::max(s.width, 1), area_h / std::max(s.height, 1)));
    p.x = pad + (area_w - s.width * p.scale) / 2;
    p.y = pad + (area_h - s.height * p.scale) / 2;
    p.x = std::max(p.x, pad);
    p.y = std::max(p.y, pad);
    return p;
}

class Viewer {
public:
    Viewer(const Scenario& scenario, const ViewerOptions& o)
        : scenario_(scenario), options_(o), worker_(scenario), palette_(TraitGrid(scenario.dormancy_axis, scenario.transfer_axis)),
          view_(o.view), limit_(limit_for(scenario)),
          ode_(o.predict_ode ? ode_for(scenario) : std::vector<TraitHistoryPoint>{}) {}

    int run();

private:
    void handle_key(sf::Keyboard::Key key);
    void fit_window(sf::RenderWindow& window, unsigned w, unsigned h);
    void select(int col, int row);
    void compose(unsigned W, unsigned H);
    void draw_panel(int x, int W, int H);
    void draw_help(unsigned W, unsigned H);
    void screenshot(const std::string& file);
    void toggle_recording();

    Scenario scenario_;
    ViewerOptions options_;
    SimWorker worker_;
    TraitPalette palette_;
    Typeface font_;
    FieldView view_;
    FieldSnapshot snapshot_;
    std::vector<TraitHistoryPoint> history_;
    std::uint64_t version_ = 0;
    std::optional<std::size_t> selected_;
    bool help_ = false;
    std::unique_ptr<FrameRecorder> recorder_;  // made when recording first starts
    bool recording_ = false;
    int screenshots_ = 0;
    sf::Image canvas_;
    sf::Vector2u layout_{start_w, start_h};  // the size the window is laid out for (canvas_)
    LatticePlace place_;
    std::string message_;  // last action, shown in the panel
    std::string error_;    // why the simulation stopped early (SimWorker::error), once printed
    std::optional<LimitPrediction> limit_;  // dashed in the plot when the limit applies
    std::vector<TraitHistoryPoint> ode_;    // dotted in the plot with --predict ode
};

void Viewer::handle_key(sf::Keyboard::Key key) {
    switch (key) {
        case sf::Keyboard::Space:
            worker_.set_paused(!worker_.paused());
            message_ = worker_.paused() ? "paused" : "running";
            break;
        case sf::Keyboard::S:
        case sf::Keyboard::Period:
            if (!worker_.paused()) worker_.set_paused(true);
            worker_.step_once();
            message_ = "one step";
            break;
        case sf::Keyboard::Add:
        case sf::Keyboard::Equal: worker_.set_speed(worker_.speed() * 2.0); break;
        case sf::Keyboard::Subtract:
        case sf::Keyboard::Hyphen: worker_.set_speed(worker_.speed() / 2.0); break;
        case sf::Keyboard::V:
            view_ = next_view(view_);
            // A recording follows the window: later frames show the new view.
            if (recorder_) recorder_->set_view(view_);
            break;
        case sf::Keyboard::R: toggle_recording(); break;
        case sf::Keyboard::P: screenshot("screenshot_" + std::to_string(screenshots_++) + ".png"); break;
        case sf::Keyboard::N:
            worker_.restart(worker_.seed() + 1);
            message_ = "restarted, seed " + std::to_string(worker_.seed());
            break;
        case sf::Keyboard::H:
        case sf::Keyboard::F1: help_ = !help_; break;
        default: break;
    }
}

// What happens when the window's size changes, whichever way it changed: a person dragging
// its border, the window manager, or the script (resize=W,H). The view maps one unit to one
// pixel of the window as it is now, so the canvas is never stretched; the next compose lays
// out lattice, plot and panel for the new size. Below the smallest size the window is asked
// back up to it; until it gets there (or if the window manager refuses) the canvas keeps the
// smallest layout and the window shows its top left part, unstretched.
void Viewer::fit_window(sf::RenderWindow& window, unsigned w, unsigned h) {
    w = std::max(w, 1u);
    h = std::max(h, 1u);
    window.setView(sf::View(sf::FloatRect(0.f, 0.f, static_cast<float>(w), static_cast<float>(h))));
    const unsigned largest = sf::Texture::getMaximumSize();
    const sf::Vector2u wanted(std::clamp(w, min_w, std::max(largest, min_w)), std::clamp(h, min_h, std::max(largest, min_h)));
    if (wanted.x > w || wanted.y > h) window.setSize(wanted);
    layout_ = wanted;
}

void Viewer::toggle_recording() {
    if (recording_) {
        recording_ = false;
        message_ = "recorded " + std::to_string(recorder_->frames()) + " frames to " + recorder_->directory().string();
        return;
    }
    // One recorder for the whole session, so that stopping and starting again numbers on
    // instead of overwriting the first frames.
    if (!recorder_) {
        recorder_ = std::make_unique<FrameRecorder>(options_.record_dir, std::max(scenario_.frame_scale, place_.scale), view_);
    }
    recorder_->set_view(view_);
    recording_ = true;
    recorder_->write(snapshot_);
    message_ = "recording to " + options_.record_dir;
}

void Viewer::select(int col, int row) {
    if (col >= 0 && row >= 0 && col < snapshot_.width && row < snapshot_.height) {
        selected_ = static_cast<std::size_t>(row) * snapshot_.width + col;
    }
}

void Viewer::screenshot(const std::string& file) {
    message_ = canvas_.saveToFile(file) ? "saved " + file : "cannot write " + file;
    std::cout << message_ << "\n";
}

void Viewer::draw_panel(int x, int W, int H) {
    fill_rect(canvas_, x, 0, W - x, H, to_sf(panel_colour));
    const int tx = x + pad, tw = W - x - 2 * pad;
    int y = pad;
    // A line too long for the panel (a long title, a message naming a long path) is cut
    // short with "..." rather than running off the window.
    auto line = [&](std::string s, unsigned size, Rgb8 colour) {
        while (s.size() > 4 && font_.width(s, size) > tw) s = s.substr(0, s.size() - 4) + "...";
        font_.draw(canvas_, tx, y, s, size, to_sf(colour));
        y += font_.line_height(size) + 3;
    };
    line(scenario_.title.empty() ? "tessera" : scenario_.title, 13, text_colour);
    line(time_stamp(snapshot_.t, snapshot_.t_logK) + (!error_.empty() ? "  (stopped)" : worker_.finished() ? "  (end)" : ""), 13,
         text_colour);
    line(format("K = %g", scenario_.K) + "   method " + name_of(scenario_.method) +
             "   seed " + std::to_string(worker_.seed()), 11, muted_text_colour);
    line(format("speed %.3g time units / s", worker_.speed()) + (worker_.paused() ? "   PAUSED" : ""), 11,
         worker_.paused() ? Rgb8{255, 200, 90} : muted_text_colour);
    if (recording_) line("REC " + std::to_string(recorder_->frames()) + " frames (R stops)", 11, Rgb8{255, 110, 100});
    if (!message_.empty()) line(message_, 11, muted_text_colour);
    if (!error_.empty()) {
        // The whole message (it names the limit and what to change), word-wrapped.
        const Rgb8 red{255, 110, 100};
        std::string rest = "stopped: " + error_, row;
        while (!rest.empty()) {
            const std::size_t space = rest.find(' ');
            const std::string word = rest.substr(0, space);
            rest = space == std::string::npos ? "" : rest.substr(space + 1);
            const std::string longer = row.empty() ? word : row + " " + word;
            if (!row.empty() && font_.width(longer, 11) > tw) {
                line(row, 11, red);
                row = word;
            } else {
                row = longer;
            }
        }
        if (!row.empty()) line(row, 11, red);
    }
    line("H: keys and help", 11, muted_text_colour);
    y += 6;
    draw_legend(&canvas_, font_, tx, y, tw, snapshot_, view_, palette_);
}

void Viewer::draw_help(unsigned W, unsigned H) {
    // Wide enough for the longest description, so no line runs past the box.
    constexpr int key_column = 130;
    int w = 520;
    for (const std::string l : help_lines) {
        const std::size_t gap = l.find("  ");
        const int text_w = gap == std::string::npos ? font_.width(l, 13) : key_column + font_.width(l.substr(l.find_first_not_of(' ', gap)), 13);
        w = std::max(w, text_w + 36);
    }
    const int h = 30 + static_cast<int>(std::size(help_lines)) * (font_.line_height(13) + 4);
    const int x = (static_cast<int>(W) - w) / 2, y = (static_cast<int>(H) - h) / 2;
    for (int j = 0; j < h; ++j) {
        for (int i = 0; i < w; ++i) blend_pixel(canvas_, x + i, y + j, sf::Color(12, 12, 16), 0.9);
    }
    outline_rect(canvas_, x, y, w, h, to_sf(muted_text_colour));
    int ty = y + 14;
    for (const std::string l : help_lines) {
        // "KEY   what it does": the key in its own column (the font is proportional).
        const std::size_t gap = l.find("  ");
        const bool keyed = gap != std::string::npos && l.rfind("tessera", 0) != 0;
        font_.draw(canvas_, x + 18, ty, keyed ? l.substr(0, gap) : l, 13, to_sf(text_colour));
        if (keyed) font_.draw(canvas_, x + key_column, ty, l.substr(l.find_first_not_of(' ', gap)), 13, to_sf(muted_text_colour));
        ty += font_.line_height(13) + 4;
    }
}

void Viewer::compose(unsigned W, unsigned H) {
    canvas_.create(W, H, to_sf(empty_colour));
    fill_rect(canvas_, 0, 0, static_cast<int>(W), static_cast<int>(H), sf::Color(26, 27, 33));
    place_ = place_lattice(snapshot_, W, H);
    paste(canvas_, rasterise(snapshot_, view_, place_.scale, palette_), place_.x, place_.y);
    if (selected_) {
        const int col = static_cast<int>(*selected_ % static_cast<std::size_t>(snapshot_.width));
        const int row = static_cast<int>(*selected_ / static_cast<std::size_t>(snapshot_.width));
        outline_rect(canvas_, place_.x + col * place_.scale - 1, place_.y + row * place_.scale - 1, place_.scale + 2,
                     place_.scale + 2, sf::Color::White);
    }
    const int panel_x = static_cast<int>(W) - panel_w;
    const int bottom_y = static_cast<int>(H) - bottom_h;
    // With a patch selected the plot takes three fifths of the width below the lattice and
    // the inspector the rest, but never less than it needs for its numbers.
    const int below_w = panel_x - 2 * pad;
    const int plot_w = selected_ ? std::min(below_w * 3 / 5, below_w - pad - inspector_min_w) : below_w;
    TraitPlotInputs plot;
    plot.history = &history_;
    plot.until_logK = scenario_.until * (scenario_.time_unit == TimeUnit::logK ? 1.0 : 1.0 / std::log(scenario_.K));
    plot.limit = limit_ ? &*limit_ : nullptr;
    plot.ode = ode_.empty() ? nullptr : &ode_;
    plot.one_patch = scenario_.habitat_of_patch.size() <= 1;
    draw_trait_plot(canvas_, font_, pad, bottom_y, plot_w, bottom_h - pad, plot, palette_);
    if (selected_) {
        draw_patch_inspector(canvas_, font_, 2 * pad + plot_w, bottom_y, panel_x - 3 * pad - plot_w, bottom_h - pad,
                             snapshot_, *selected_, palette_);
    } else {
        font_.draw(canvas_, pad + 8, bottom_y - font_.line_height(11) - 4, "click a patch to see its counts per trait", 11,
                   to_sf(muted_text_colour));
    }
    draw_panel(panel_x, static_cast<int>(W), static_cast<int>(H));
    if (help_) draw_help(W, H);
}

int Viewer::run() {
    std::vector<ScriptStep> script;
    try {
        script = parse_viewer_script(options_.script);
    } catch (const std::invalid_argument& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    }
    if (!std::getenv("DISPLAY") && !std::getenv("WAYLAND_DISPLAY")) {
        std::cerr << "error: tessera view needs a display (none is set: DISPLAY is empty). On a machine without one,\n"
                     "use 'tessera run' with output.frames_every, or 'xvfb-run -a tessera view ...'\n";
        return 1;
    }
    sf::RenderWindow window(sf::VideoMode(start_w, start_h), "tessera view: " + scenario_.title);
    window.setFramerateLimit(30);
    sf::Texture texture;
    std::size_t next_step = 0;
    int wait_frames = 0;
    int drawn = 0;
    bool start_recording = options_.record_at_start;
    version_ = worker_.fetch(0, snapshot_, history_);
    while (window.isOpen()) {
        sf::Event event;
        while (window.pollEvent(event)) {
            if (event.type == sf::Event::Closed) window.close();
            if (event.type == sf::Event::Resized) fit_window(window, event.size.width, event.size.height);
            if (event.type == sf::Event::KeyPressed) {
                if (event.key.code == sf::Keyboard::Escape || event.key.code == sf::Keyboard::Q) window.close();
                else handle_key(event.key.code);
            }
            if (event.type == sf::Event::MouseButtonPressed && event.mouseButton.button == sf::Mouse::Left) {
                const sf::Vector2f at = window.mapPixelToCoords({event.mouseButton.x, event.mouseButton.y});
                const int mx = static_cast<int>(std::floor(at.x)) - place_.x, my = static_cast<int>(std::floor(at.y)) - place_.y;
                if (mx >= 0 && my >= 0) select(mx / place_.scale, my / place_.scale);
            }
        }
        if (!window.isOpen()) break;

        // Scripted input: one command per frame, `frames=N` waits N frames.
        if (wait_frames > 0) {
            --wait_frames;
        } else if (next_step < script.size()) {
            const ScriptStep& s = script[next_step++];
            switch (s.kind) {
                case ScriptStep::Kind::frames: wait_frames = s.count; break;
                case ScriptStep::Kind::key:
                    if (s.key == sf::Keyboard::Escape || s.key == sf::Keyboard::Q) window.close();
                    else handle_key(s.key);
                    break;
                case ScriptStep::Kind::click: select(s.col, s.row); break;
                case ScriptStep::Kind::resize:
                    // As a drag would: the window takes the new size, then the same handler
                    // as for the Resized event runs now, so that the very next frame (and
                    // screenshot) is laid out for it. The Resized events that follow run
                    // it again with the same sizes and change nothing more.
                    window.setSize({s.width, s.height});
                    fit_window(window, s.width, s.height);
                    break;
                case ScriptStep::Kind::screenshot: screenshot(s.file); break;
                case ScriptStep::Kind::quit: window.close(); break;
            }
            if (!window.isOpen()) break;
        }

        const std::uint64_t v = worker_.fetch(version_, snapshot_, history_);
        if (v != version_ && recording_) recorder_->write(snapshot_);
        if (v != version_) {
            // A run stopped early (a patch would pass 2^62 cells): shown in the panel until a
            // restart clears it, and printed once.
            const std::string error = worker_.error();
            if (!error.empty() && error != error_) std::cerr << "error: " << error << "\n";
            error_ = error;
        }
        version_ = v;
        const sf::Vector2u size = layout_;
        compose(size.x, size.y);
        // --record: start once the lattice has been placed, so the frames get the window's scale.
        if (start_recording) {
            start_recording = false;
            if (!recording_) toggle_recording();
        }
        if (texture.getSize() != size) texture.create(size.x, size.y);
        texture.update(canvas_);
        window.clear();
        window.draw(sf::Sprite(texture));
        window.display();
        if (options_.frames > 0 && ++drawn >= options_.frames) window.close();
    }
    if (recorder_) std::cout << "recorded " << recorder_->frames() << " frames to " << recorder_->directory().string() << "\n";
    return error_.empty() ? 0 : 2;  // 2: the simulation on screen was stopped by a limit
}

}  // namespace

int run_viewer(const Scenario& scenario, const ViewerOptions& options) {
    Viewer viewer(scenario, options);
    return viewer.run();
}

}  // namespace tessera
