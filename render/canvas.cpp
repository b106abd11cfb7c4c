#include "render/canvas.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>

namespace tessera {

sf::Color mix(sf::Color under, sf::Color over, double a) {
    a = std::clamp(a, 0.0, 1.0);
    auto m = [a](std::uint8_t u, std::uint8_t o) {
        return static_cast<std::uint8_t>(std::lround(u + (o - u) * a));
    };
    return sf::Color(m(under.r, over.r), m(under.g, over.g), m(under.b, over.b));
}

void fill_rect(sf::Image& image, int x, int y, int w, int h, sf::Color colour) {
    const int W = static_cast<int>(image.getSize().x), H = static_cast<int>(image.getSize().y);
    const int x0 = std::max(x, 0), y0 = std::max(y, 0), x1 = std::min(x + w, W), y1 = std::min(y + h, H);
    for (int j = y0; j < y1; ++j) {
        for (int i = x0; i < x1; ++i) image.setPixel(static_cast<unsigned>(i), static_cast<unsigned>(j), colour);
    }
}

void outline_rect(sf::Image& image, int x, int y, int w, int h, sf::Color colour) {
    fill_rect(image, x, y, w, 1, colour);
    fill_rect(image, x, y + h - 1, w, 1, colour);
    fill_rect(image, x, y, 1, h, colour);
    fill_rect(image, x + w - 1, y, 1, h, colour);
}

void blend_pixel(sf::Image& image, int x, int y, sf::Color colour, double a) {
    if (x < 0 || y < 0 || x >= static_cast<int>(image.getSize().x) || y >= static_cast<int>(image.getSize().y)) return;
    const auto ux = static_cast<unsigned>(x), uy = static_cast<unsigned>(y);
    image.setPixel(ux, uy, mix(image.getPixel(ux, uy), colour, a));
}

void draw_line(sf::Image& image, int x0, int y0, int x1, int y1, sf::Color colour) {
    const int dx = std::abs(x1 - x0), dy = -std::abs(y1 - y0);
    const int sx = x0 < x1 ? 1 : -1, sy = y0 < y1 ? 1 : -1;
    int err = dx + dy;
    for (;;) {
        blend_pixel(image, x0, y0, colour, 1.0);
        if (x0 == x1 && y0 == y1) return;
        const int e2 = 2 * err;
        if (e2 >= dy) {
            err += dy;
            x0 += sx;
        }
        if (e2 <= dx) {
            err += dx;
            y0 += sy;
        }
    }
}

void paste(sf::Image& target, const sf::Image& source, int x, int y) {
    const int W = static_cast<int>(source.getSize().x), H = static_cast<int>(source.getSize().y);
    const int TW = static_cast<int>(target.getSize().x), TH = static_cast<int>(target.getSize().y);
    for (int j = 0; j < H; ++j) {
        if (y + j < 0 || y + j >= TH) continue;
        for (int i = 0; i < W; ++i) {
            if (x + i < 0 || x + i >= TW) continue;
            target.setPixel(static_cast<unsigned>(x + i), static_cast<unsigned>(y + j),
                            source.getPixel(static_cast<unsigned>(i), static_cast<unsigned>(j)));
        }
    }
}

}  // namespace tessera
