// What a figure shows, independent of how it is drawn: panels with their axes, curves,
// bands, shaded time intervals and coloured cells, a title and a legend. The builders
// (run_figure.*, regime_figure.*) make one from the inputs; figure_layout.* places it on a
// page and plplot_drawing.* draws it. Keeping the three apart lets the tests compute where a
// point must land without reading the picture.
#pragma once

#include <limits>
#include <string>
#include <vector>

#include "render/colour_lab.hpp"

namespace tessera {

enum class LineStyle { solid, dashed, dotted };

struct Curve {
    std::vector<double> x, y;  // NaN in y breaks the line
    Rgb8 colour;
    LineStyle style = LineStyle::solid;
    double width = 2.0;  // in units of the layout's line width
};

// A filled region between two curves over the same x (the 10-90 % band of an ensemble).
struct Band {
    std::vector<double> x, low, high;
    Rgb8 colour;
    double opacity = 0.3;
};

// An interval of the x axis shaded over the panel's full height (a schedule switched on).
struct Shading {
    double from = 0.0, to = 0.0;
};

// A filled rectangle in data coordinates with an optional label (a regime map's cell).
struct Cell {
    double x0 = 0.0, x1 = 0.0, y0 = 0.0, y1 = 0.0;
    Rgb8 fill;
    std::string text;  // drawn centred when it fits inside the cell
    Rgb8 text_colour{0, 0, 0};
};

struct Panel {
    std::string title;  // above the panel; "" for none
    double x_min = 0.0, x_max = 1.0, y_min = 0.0, y_max = 1.0;
    bool log_y = false;  // y values are log10 of the quantity; ticks read 10^k
    // Categorical axes: label i sits at coordinate i (cells span i - 1/2 .. i + 1/2).
    std::vector<std::string> x_categories, y_categories;
    bool dark = true;  // dark plot area (curves in the trait palette) or light (regime maps)
    std::vector<Shading> shading;
    std::vector<Band> bands;
    std::vector<Curve> curves;
    std::vector<Cell> cells;
    // A vertical line (the current time, a limit's end); NaN for none.
    double marker_x = std::numeric_limits<double>::quiet_NaN();
};

struct LegendEntry {
    enum class Kind { line, dashed, dotted, band, swatch, shading, heading, note };
    Kind kind = Kind::line;
    Rgb8 colour;
    std::string text;
};

struct Figure {
    std::string title, subtitle;
    std::string x_label, y_label;  // shared by every panel
    std::vector<Panel> panels;     // laid out in a grid, row by row
    std::vector<LegendEntry> legend;
};

}  // namespace tessera
