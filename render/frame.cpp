#include "render/frame.hpp"

#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "render/canvas.hpp"
#include "render/colour_ramps.hpp"
#include "render/legend.hpp"
#include "render/rasteriser.hpp"

namespace tessera {

std::string time_stamp(double t, double t_logK) {
    char buf[96];
    std::snprintf(buf, sizeof buf, "t = %.4g   t/lnK = %.4g", t, t_logK);
    return buf;
}

sf::Image compose_frame(const FieldSnapshot& s, FieldView view, int scale, const TraitPalette& palette,
                        Typeface& font) {
    constexpr int pad = 10;
    const sf::Image lattice = rasterise(s, view, scale, palette);
    const int lw = static_cast<int>(lattice.getSize().x), lh = static_cast<int>(lattice.getSize().y);
    const int panel_x = lw + pad;
    const int text_w = frame_panel_width - 2 * pad;

    // Measure the panel first so the frame is exactly as tall as it needs.
    const std::vector<ScheduleStatus> schedules = schedule_status(s);
    const int schedule_h = static_cast<int>(schedules.size()) * (font.line_height(13) + 2);
    const int stamp_h = font.line_height(13) + 8 + schedule_h;
    const int legend_h = draw_legend(nullptr, font, 0, 0, text_w, s, view, palette);
    const int height = std::max(lh, pad + stamp_h + legend_h + pad);

    sf::Image frame;
    frame.create(static_cast<unsigned>(panel_x + frame_panel_width), static_cast<unsigned>(height), to_sf(panel_colour));
    paste(frame, lattice, 0, 0);
    int y = pad;
    font.draw(frame, panel_x + pad, y, time_stamp(s.t, s.t_logK), 13, to_sf(text_colour));
    // Schedules in force are named in the header, in the accent colour.
    int sy = y + font.line_height(13) + 2;
    for (const ScheduleStatus& sc : schedules) {
        font.draw(frame, panel_x + pad, sy, sc.text(), 13, to_sf(sc.on ? schedule_on_colour : muted_text_colour));
        sy += font.line_height(13) + 2;
    }
    y += stamp_h;
    draw_legend(&frame, font, panel_x + pad, y, text_w, s, view, palette);
    return frame;
}

}  // namespace tessera
