#include "render/typeface.hpp"

#include <ft2build.h>
#include FT_FREETYPE_H

#include <cstdlib>
#include <stdexcept>

#include "render/canvas.hpp"

namespace tessera {

struct Typeface::Face {
    FT_Library library = nullptr;
    FT_Face face = nullptr;
    unsigned size = 0;  // pixel size currently set on `face`

    void set_size(unsigned s) {
        if (s != size) {
            FT_Set_Pixel_Sizes(face, 0, s);
            size = s;
        }
    }
};

namespace {

// Decodes one UTF-8 sequence at text[i] and advances i; malformed bytes read as '?'.
char32_t next_code_point(std::string_view text, std::size_t& i) {
    const auto c = static_cast<unsigned char>(text[i++]);
    int extra = c < 0x80 ? 0 : (c >> 5) == 0x6 ? 1 : (c >> 4) == 0xE ? 2 : (c >> 3) == 0x1E ? 3 : -1;
    if (extra < 0) return U'?';
    char32_t code = extra == 0 ? c : c & (0x3F >> extra);
    for (; extra > 0; --extra) {
        if (i >= text.size()) return U'?';
        code = (code << 6) | (static_cast<unsigned char>(text[i++]) & 0x3F);
    }
    return code;
}

}  // namespace

std::string Typeface::default_path() {
    if (const char* env = std::getenv("TESSERA_FONT"); env && *env) return env;
    return "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf";
}

Typeface::Typeface(const std::string& path) : face_(std::make_unique<Face>()) {
    if (FT_Init_FreeType(&face_->library) != 0) throw std::runtime_error("cannot start FreeType");
    if (FT_New_Face(face_->library, path.c_str(), 0, &face_->face) != 0) {
        FT_Done_FreeType(face_->library);
        throw std::runtime_error(path + ": cannot open the font (install fonts-dejavu-core or set TESSERA_FONT)");
    }
}

Typeface::~Typeface() {
    FT_Done_Face(face_->face);
    FT_Done_FreeType(face_->library);
}

const Typeface::Glyph& Typeface::glyph(char32_t code, unsigned size) {
    const auto key = std::make_pair(size, code);
    if (auto it = cache_.find(key); it != cache_.end()) return it->second;
    face_->set_size(size);
    Glyph g;
    if (FT_Load_Char(face_->face, code, FT_LOAD_RENDER) == 0) {
        const FT_GlyphSlot slot = face_->face->glyph;
        const FT_Bitmap& bm = slot->bitmap;
        g.width = static_cast<int>(bm.width);
        g.rows = static_cast<int>(bm.rows);
        g.left = slot->bitmap_left;
        g.top = slot->bitmap_top;
        g.advance = static_cast<int>(slot->advance.x >> 6);
        g.coverage.resize(static_cast<std::size_t>(g.width) * g.rows);
        for (int r = 0; r < g.rows; ++r) {
            for (int c = 0; c < g.width; ++c) {
                g.coverage[static_cast<std::size_t>(r) * g.width + c] = bm.buffer[r * bm.pitch + c];
            }
        }
    }
    return cache_.emplace(key, std::move(g)).first->second;
}

int Typeface::ascender(unsigned size) {
    face_->set_size(size);
    return static_cast<int>(face_->face->size->metrics.ascender >> 6);
}

int Typeface::line_height(unsigned size) {
    face_->set_size(size);
    const auto& m = face_->face->size->metrics;
    return static_cast<int>((m.ascender - m.descender) >> 6);
}

int Typeface::width(std::string_view text, unsigned size) {
    int w = 0;
    for (std::size_t i = 0; i < text.size();) w += glyph(next_code_point(text, i), size).advance;
    return w;
}

int Typeface::draw(sf::Image& image, int x, int y, std::string_view text, unsigned size, sf::Color colour) {
    const int baseline = y + ascender(size);
    int pen = x;
    for (std::size_t i = 0; i < text.size();) {
        const Glyph& g = glyph(next_code_point(text, i), size);
        for (int r = 0; r < g.rows; ++r) {
            for (int c = 0; c < g.width; ++c) {
                const std::uint8_t a = g.coverage[static_cast<std::size_t>(r) * g.width + c];
                if (a) blend_pixel(image, pen + g.left + c, baseline - g.top + r, colour, a / 255.0);
            }
        }
        pen += g.advance;
    }
    return pen - x;
}

}  // namespace tessera
