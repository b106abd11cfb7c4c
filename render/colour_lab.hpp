// Colour arithmetic for the palette and its tests: sRGB <-> CIELAB (D65 white, the sRGB
// standard's own white point) and the CIE76 and CIEDE2000 colour differences. Written out
// here, a few lines each, so that the palette's distinctness claims rest on formulas a
// reader can check against the standards, not on a library's defaults.
#pragma once

#include <cstdint>

namespace tessera {

struct Rgb8 {
    std::uint8_t r = 0, g = 0, b = 0;
    friend bool operator==(const Rgb8&, const Rgb8&) = default;
};

// Linear-light RGB, each channel in [0, 1] when inside the sRGB gamut.
struct LinearRgb {
    double r = 0, g = 0, b = 0;
};

struct Lab {
    double L = 0, a = 0, b = 0;
};

// The sRGB transfer curve (IEC 61966-2-1) and its inverse, channel values in [0, 1].
double srgb_to_linear(double encoded);
double linear_to_srgb(double linear);

LinearRgb to_linear(Rgb8 c);
// Rounds to 8 bits; channels outside [0, 1] are clamped.
Rgb8 to_rgb8(LinearRgb c);

Lab lab_from_linear(LinearRgb c);
Lab lab_from_rgb8(Rgb8 c);
// The inverse; the result may lie outside [0, 1] when the colour is out of the sRGB gamut.
LinearRgb linear_from_lab(Lab c);
bool in_gamut(LinearRgb c);

// CIE 1976: Euclidean distance in CIELAB.
double delta_e76(Lab x, Lab y);
// CIEDE2000 (CIE 142-2001; formulas as in Sharma, Wu & Dalal, Color Res. Appl. 30, 2005),
// with kL = kC = kH = 1.
double delta_e2000(Lab x, Lab y);

}  // namespace tessera
