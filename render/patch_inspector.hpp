// The clicked patch in detail: per trait, its active and dormant counts as bars on the
// exponent scale log(1 + n) / log K_p (0 = none, 1 = a full patch), with the numbers.
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <cstddef>

#include "render/field_snapshot.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"

namespace tessera {

void draw_patch_inspector(sf::Image& image, Typeface& font, int x, int y, int w, int h, const FieldSnapshot& s,
                          std::size_t patch, const TraitPalette& palette);

}  // namespace tessera
