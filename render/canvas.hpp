// Drawing primitives on an sf::Image, all on the CPU, so that frames can be made on a
// machine without a display (SFML's own RenderTexture needs an OpenGL context, which needs
// an X display). Every primitive clips to the image.
#pragma once

#include <SFML/Graphics/Color.hpp>
#include <SFML/Graphics/Image.hpp>

#include "render/colour_lab.hpp"

namespace tessera {

inline sf::Color to_sf(Rgb8 c, std::uint8_t alpha = 255) { return sf::Color(c.r, c.g, c.b, alpha); }
inline Rgb8 from_sf(sf::Color c) { return {c.r, c.g, c.b}; }

// Mixes `over` onto `under` with weight `a` in [0, 1] (sRGB-encoded mix, as screens blend).
sf::Color mix(sf::Color under, sf::Color over, double a);

void fill_rect(sf::Image& image, int x, int y, int w, int h, sf::Color colour);
void outline_rect(sf::Image& image, int x, int y, int w, int h, sf::Color colour);
void blend_pixel(sf::Image& image, int x, int y, sf::Color colour, double a);
// A line one pixel wide (Bresenham), for plots.
void draw_line(sf::Image& image, int x0, int y0, int x1, int y1, sf::Color colour);
// Copies `source` into `target` with its top-left corner at (x, y).
void paste(sf::Image& target, const sf::Image& source, int x, int y);

}  // namespace tessera
