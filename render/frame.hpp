// A whole frame as recorded to PNG: the lattice on the left, a side panel on the right with
// the time (plain and t / ln K), the view's legend and the title. Drawn entirely on the CPU.
#pragma once

#include <SFML/Graphics/Image.hpp>

#include <string>

#include "render/field_snapshot.hpp"
#include "render/field_view.hpp"
#include "render/trait_palette.hpp"
#include "render/typeface.hpp"

namespace tessera {

inline constexpr int frame_panel_width = 250;

// "t = 12.5   t/lnK = 1.357": the time stamp every frame carries.
std::string time_stamp(double t, double t_logK);

sf::Image compose_frame(const FieldSnapshot& s, FieldView view, int scale, const TraitPalette& palette,
                        Typeface& font);

}  // namespace tessera
