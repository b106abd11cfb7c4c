// Draws a laid-out figure with PLplot into a PNG, SVG or PDF file, chosen by the file's
// extension: .png with the cairo PNG driver (antialiased), .pdf with the cairo PDF driver,
// .svg with PLplot's own SVG driver, which keeps text as <text> elements (cairo's SVG turns
// every glyph into an outline, which editors cannot change and scripts cannot search).
#pragma once

#include <optional>
#include <string>

#include "render/figures/figure_layout.hpp"
#include "render/figures/figure_model.hpp"

namespace tessera {

enum class FigureFormat { png, svg, pdf };

// The format named by the file's extension (case-insensitive), or nullopt.
std::optional<FigureFormat> figure_format_of(const std::string& file);

// Throws std::runtime_error when the file cannot be written.
void draw_figure(const Figure& figure, const FigureLayout& layout, const std::string& file, FigureFormat format);

}  // namespace tessera
