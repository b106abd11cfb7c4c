#include "render/viewer_script.hpp"

#include <stdexcept>
#include <tuple>
#include <utility>

namespace tessera {

namespace {

sf::Keyboard::Key key_named(const std::string& name) {
    if (name.size() == 1 && name[0] >= 'A' && name[0] <= 'Z') return static_cast<sf::Keyboard::Key>(sf::Keyboard::A + (name[0] - 'A'));
    if (name.size() == 1 && name[0] >= 'a' && name[0] <= 'z') return static_cast<sf::Keyboard::Key>(sf::Keyboard::A + (name[0] - 'a'));
    if (name == "Space") return sf::Keyboard::Space;
    if (name == "Plus") return sf::Keyboard::Add;
    if (name == "Minus") return sf::Keyboard::Subtract;
    if (name == "F1") return sf::Keyboard::F1;
    if (name == "Escape") return sf::Keyboard::Escape;
    if (name == "Period") return sf::Keyboard::Period;
    throw std::invalid_argument("key=" + name + ": unknown key; accepted: A-Z, Space, Plus, Minus, F1, Escape, Period");
}

// "800,600" -> 800 and 600: two whole numbers of pixels, nothing else.
std::pair<unsigned, unsigned> window_size(const std::string& value) {
    const std::string why = "expected resize=W,H, the window's width and height in pixels, each 1 to " +
                            std::to_string(max_script_window);
    const std::size_t comma = value.find(',');
    if (comma == std::string::npos) throw std::invalid_argument(why);
    auto one = [&](const std::string& part) {
        if (part.empty() || part.size() > 5 || part.find_first_not_of("0123456789") != std::string::npos) throw std::invalid_argument(why);
        const unsigned v = static_cast<unsigned>(std::stoul(part));
        if (v < 1 || v > max_script_window) throw std::invalid_argument(why);
        return v;
    };
    return {one(value.substr(0, comma)), one(value.substr(comma + 1))};
}

}  // namespace

std::vector<ScriptStep> parse_viewer_script(const std::string& text) {
    std::vector<ScriptStep> steps;
    std::size_t start = 0;
    while (start <= text.size()) {
        const std::size_t end = std::min(text.find(';', start), text.size());
        const std::string item = text.substr(start, end - start);
        start = end + 1;
        if (item.empty()) continue;
        const std::size_t eq = item.find('=');
        const std::string name = item.substr(0, eq), value = eq == std::string::npos ? "" : item.substr(eq + 1);
        ScriptStep s;
        try {
            if (name == "frames") {
                s.kind = ScriptStep::Kind::frames;
                s.count = std::stoi(value);
            } else if (name == "key") {
                s.kind = ScriptStep::Kind::key;
                s.key = key_named(value);
            } else if (name == "click") {
                s.kind = ScriptStep::Kind::click;
                const std::size_t comma = value.find(',');
                if (comma == std::string::npos) throw std::invalid_argument("");
                s.col = std::stoi(value.substr(0, comma));
                s.row = std::stoi(value.substr(comma + 1));
            } else if (name == "resize") {
                s.kind = ScriptStep::Kind::resize;
                std::tie(s.width, s.height) = window_size(value);
            } else if (name == "screenshot" && !value.empty()) {
                s.kind = ScriptStep::Kind::screenshot;
                s.file = value;
            } else if (name == "quit") {
                s.kind = ScriptStep::Kind::quit;
            } else {
                throw std::invalid_argument("");
            }
        } catch (const std::invalid_argument& e) {
            const std::string why = e.what();
            throw std::invalid_argument("--script: '" + item + "': " +
                                        (why.empty() ? "expected frames=N, key=NAME, click=COL,ROW, resize=W,H, screenshot=FILE or quit" : why));
        }
        steps.push_back(s);
    }
    return steps;
}

}  // namespace tessera
