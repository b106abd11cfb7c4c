// Text drawn straight into an sf::Image with FreeType, so that frames with labels can be
// made without a display (sf::Text needs an OpenGL context). The font is DejaVu Sans from
// Debian's fonts-dejavu-core; TESSERA_FONT may name another TrueType file.
//
// Not thread-safe: each drawing thread keeps its own Typeface (it caches glyphs).
#pragma once

#include <SFML/Graphics/Color.hpp>
#include <SFML/Graphics/Image.hpp>

#include <cstdint>
#include <map>
#include <memory>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace tessera {

class Typeface {
public:
    // Throws std::runtime_error naming the file when it cannot be opened.
    explicit Typeface(const std::string& path = default_path());
    ~Typeface();
    Typeface(const Typeface&) = delete;
    Typeface& operator=(const Typeface&) = delete;

    static std::string default_path();

    // Draws UTF-8 `text` with the top of its line box at y; returns the width drawn (px).
    int draw(sf::Image& image, int x, int y, std::string_view text, unsigned size, sf::Color colour);
    int width(std::string_view text, unsigned size);
    // Height of a line box at this size: ascender to descender, in pixels.
    int line_height(unsigned size);

private:
    struct Glyph {
        int width = 0, rows = 0, left = 0, top = 0, advance = 0;
        std::vector<std::uint8_t> coverage;
    };
    const Glyph& glyph(char32_t code, unsigned size);
    int ascender(unsigned size);

    struct Face;
    std::unique_ptr<Face> face_;
    std::map<std::pair<unsigned, char32_t>, Glyph> cache_;
};

}  // namespace tessera
