// Continuous colour scales for the one-number views, each our own, each with lightness
// rising monotonically so the order of values reads without colour vision:
//   dormant fraction  night blue -> pale ice ("asleep = cold")
//   exponent          deep violet -> ember orange -> pale yellow (empty to full)
//   stress            neutral grey -> alarm red
// The transfer view reuses the trait palette's hue axis (at middle lightness), so a mean
// transfer ability looks like the traits that carry it.
#pragma once

#include "render/colour_lab.hpp"

namespace tessera {

// s in [0, 1], clamped.
Rgb8 dormant_ramp(double s);
Rgb8 exponent_ramp(double s);
Rgb8 stress_ramp(double s);
Rgb8 transfer_ramp(double s);

// Fixed colours shared by every view.
inline constexpr Rgb8 empty_colour{18, 20, 26};      // a patch with no cells
inline constexpr Rgb8 wall_colour{150, 142, 128};    // capacity 0: no cells, no passage
inline constexpr Rgb8 wall_stripe{96, 90, 80};       // its hatching, at 4 px per patch or more
inline constexpr Rgb8 panel_colour{34, 36, 44};      // side panel background
inline constexpr Rgb8 text_colour{228, 228, 232};
inline constexpr Rgb8 muted_text_colour{160, 162, 172};
inline constexpr Rgb8 schedule_on_colour{255, 146, 92};  // a schedule in force, in headers

}  // namespace tessera
