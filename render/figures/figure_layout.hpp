// Where everything of a figure goes on a page of W x H pixels: the panels' plot boxes, the
// title, the axis labels and the legend. Pure arithmetic on the figure model and estimated
// text widths (no drawing library), so the tests can compute where a data point must land.
//
// Sizes follow the page: text is `em` pixels high, em = 13 px at 800 x 500 and in proportion
// to the smaller of W / 800 and H / 500 (bounded), so a figure looks the same at 1600 x 1000,
// only sharper. Room for text is reserved from an estimate of its width (0.56 em per
// character; PLplot's sans-serif at our sizes measures 0.48-0.52 em, so nothing is clipped).
#pragma once

#include <string>
#include <vector>

#include "render/figures/figure_model.hpp"

namespace tessera {

// A rectangle in pixels, y downwards from the top of the page.
struct PixelBox {
    double left = 0.0, top = 0.0, right = 0.0, bottom = 0.0;
    double width() const { return right - left; }
    double height() const { return bottom - top; }
};

struct FigureLayout {
    int width = 0, height = 0;
    double em = 13.0;              // text height in pixels
    double line_width = 1.0;       // pixels per unit of Curve::width
    std::vector<PixelBox> panels;  // plot boxes, in the order of Figure::panels
    int columns = 1, rows = 1;
    double title_y = 0.0, subtitle_y = 0.0;  // centre lines of the title and subtitle
    double title_em = 0.0, subtitle_em = 0.0; // their text heights (shrunk to fit the width)
    double tick_em = 0.0, label_em = 0.0;     // tick labels; axis labels, legend and panel titles
    double x_label_y = 0.0;                  // centre line of the shared x label
    double y_label_x = 0.0;                  // centre line of the (rotated) shared y label
    PixelBox legend;                         // the legend's frame ("" legend: zero size)
    int legend_columns = 1;
    double legend_row = 0.0;  // height of one legend row
    struct Point {
        double x = 0.0, y = 0.0;
    };
    std::vector<Point> legend_at;  // left end and centre line of each legend entry

    // Pixel of data point (x, y) in panel `p` (log_y panels take y already as log10).
    double pixel_x(const Figure& f, std::size_t p, double x) const;
    double pixel_y(const Figure& f, std::size_t p, double y) const;
};

// Estimated width in pixels of `text` at text height `em`.
double text_width(const std::string& text, double em);

FigureLayout lay_out(const Figure& figure, int width, int height);

}  // namespace tessera
