// Scripted input for the window, so tests (and demos) can drive it without a person:
//   "frames=60;key=V;key=Space;click=3,4;screenshot=out.png;quit"
// Commands run in order, one per drawn frame except `frames=N`, which waits N frames.
//   frames=N          draw N frames
//   key=NAME          press a key: a letter A-Z, Space, Plus, Minus, F1, Escape, Period
//   click=COL,ROW     select the patch at lattice column COL, row ROW
//   resize=W,H        resize the window to W x H pixels, as if its border were dragged
//                     (below the viewer's smallest size it stops there, as a drag does)
//   screenshot=FILE   save what the window shows as a PNG
//   quit              close the window
#pragma once

#include <SFML/Window/Keyboard.hpp>

#include <string>
#include <vector>

namespace tessera {

struct ScriptStep {
    enum class Kind { frames, key, click, resize, screenshot, quit };
    Kind kind = Kind::frames;
    int count = 0;                      // frames
    sf::Keyboard::Key key = sf::Keyboard::Unknown;
    int col = 0, row = 0;               // click
    unsigned width = 0, height = 0;     // resize, in pixels
    std::string file;                   // screenshot
};

// The largest window a script may ask for, in either direction.
inline constexpr unsigned max_script_window = 4096;

// Throws std::invalid_argument naming the bad step.
std::vector<ScriptStep> parse_viewer_script(const std::string& text);

}  // namespace tessera
