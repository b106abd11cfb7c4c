#include "render/colour_lab.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace tessera {

namespace {

// D65 reference white, Y normalised to 1 (CIE 15:2004).
constexpr double white_x = 0.95047;
constexpr double white_y = 1.0;
constexpr double white_z = 1.08883;

constexpr double epsilon = 216.0 / 24389.0;  // (6/29)^3
constexpr double kappa = 24389.0 / 27.0;     // (29/3)^3

double lab_f(double t) { return t > epsilon ? std::cbrt(t) : (kappa * t + 16.0) / 116.0; }
double lab_f_inverse(double f) {
    const double cube = f * f * f;
    return cube > epsilon ? cube : (116.0 * f - 16.0) / kappa;
}

double degrees(double radians) { return radians * 180.0 / std::numbers::pi; }
double radians(double degrees) { return degrees * std::numbers::pi / 180.0; }

}  // namespace

double srgb_to_linear(double v) { return v <= 0.04045 ? v / 12.92 : std::pow((v + 0.055) / 1.055, 2.4); }
double linear_to_srgb(double v) { return v <= 0.0031308 ? 12.92 * v : 1.055 * std::pow(v, 1.0 / 2.4) - 0.055; }

LinearRgb to_linear(Rgb8 c) {
    return {srgb_to_linear(c.r / 255.0), srgb_to_linear(c.g / 255.0), srgb_to_linear(c.b / 255.0)};
}

Rgb8 to_rgb8(LinearRgb c) {
    auto channel = [](double v) {
        const double e = linear_to_srgb(std::clamp(v, 0.0, 1.0));
        return static_cast<std::uint8_t>(std::lround(e * 255.0));
    };
    return {channel(c.r), channel(c.g), channel(c.b)};
}

Lab lab_from_linear(LinearRgb c) {
    // sRGB primaries to XYZ (IEC 61966-2-1).
    const double X = 0.4124564 * c.r + 0.3575761 * c.g + 0.1804375 * c.b;
    const double Y = 0.2126729 * c.r + 0.7151522 * c.g + 0.0721750 * c.b;
    const double Z = 0.0193339 * c.r + 0.1191920 * c.g + 0.9503041 * c.b;
    const double fx = lab_f(X / white_x), fy = lab_f(Y / white_y), fz = lab_f(Z / white_z);
    return {116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)};
}

Lab lab_from_rgb8(Rgb8 c) { return lab_from_linear(to_linear(c)); }

LinearRgb linear_from_lab(Lab c) {
    const double fy = (c.L + 16.0) / 116.0;
    const double fx = fy + c.a / 500.0;
    const double fz = fy - c.b / 200.0;
    const double X = white_x * lab_f_inverse(fx), Y = white_y * lab_f_inverse(fy), Z = white_z * lab_f_inverse(fz);
    return {3.2404542 * X - 1.5371385 * Y - 0.4985314 * Z,
            -0.9692660 * X + 1.8760108 * Y + 0.0415560 * Z,
            0.0556434 * X - 0.2040259 * Y + 1.0572252 * Z};
}

bool in_gamut(LinearRgb c) {
    constexpr double slack = 1e-9;
    return c.r >= -slack && c.r <= 1 + slack && c.g >= -slack && c.g <= 1 + slack && c.b >= -slack &&
           c.b <= 1 + slack;
}

double delta_e76(Lab x, Lab y) { return std::hypot(x.L - y.L, x.a - y.a, x.b - y.b); }

double delta_e2000(Lab x, Lab y) {
    const double C1 = std::hypot(x.a, x.b), C2 = std::hypot(y.a, y.b);
    const double Cbar7 = std::pow((C1 + C2) / 2.0, 7.0);
    const double G = 0.5 * (1.0 - std::sqrt(Cbar7 / (Cbar7 + std::pow(25.0, 7.0))));
    const double a1 = (1.0 + G) * x.a, a2 = (1.0 + G) * y.a;
    const double C1p = std::hypot(a1, x.b), C2p = std::hypot(a2, y.b);
    auto hue = [](double b, double a) {
        if (a == 0.0 && b == 0.0) return 0.0;
        const double h = degrees(std::atan2(b, a));
        return h < 0 ? h + 360.0 : h;
    };
    const double h1 = hue(x.b, a1), h2 = hue(y.b, a2);

    const double dL = y.L - x.L;
    const double dC = C2p - C1p;
    double dh = 0.0;
    if (C1p * C2p != 0.0) {
        dh = h2 - h1;
        if (dh > 180.0) dh -= 360.0;
        if (dh < -180.0) dh += 360.0;
    }
    const double dH = 2.0 * std::sqrt(C1p * C2p) * std::sin(radians(dh / 2.0));

    const double Lbar = (x.L + y.L) / 2.0;
    const double Cbar = (C1p + C2p) / 2.0;
    double hbar = h1 + h2;
    if (C1p * C2p != 0.0) {
        if (std::fabs(h1 - h2) <= 180.0) hbar = (h1 + h2) / 2.0;
        else if (h1 + h2 < 360.0) hbar = (h1 + h2 + 360.0) / 2.0;
        else hbar = (h1 + h2 - 360.0) / 2.0;
    }
    const double T = 1.0 - 0.17 * std::cos(radians(hbar - 30.0)) + 0.24 * std::cos(radians(2.0 * hbar)) +
                     0.32 * std::cos(radians(3.0 * hbar + 6.0)) - 0.20 * std::cos(radians(4.0 * hbar - 63.0));
    const double dtheta = 30.0 * std::exp(-std::pow((hbar - 275.0) / 25.0, 2.0));
    const double Cbar7p = std::pow(Cbar, 7.0);
    const double RC = 2.0 * std::sqrt(Cbar7p / (Cbar7p + std::pow(25.0, 7.0)));
    const double SL = 1.0 + 0.015 * (Lbar - 50.0) * (Lbar - 50.0) / std::sqrt(20.0 + (Lbar - 50.0) * (Lbar - 50.0));
    const double SC = 1.0 + 0.045 * Cbar;
    const double SH = 1.0 + 0.015 * Cbar * T;
    const double RT = -std::sin(radians(2.0 * dtheta)) * RC;
    const double tl = dL / SL, tc = dC / SC, th = dH / SH;
    return std::sqrt(tl * tl + tc * tc + th * th + RT * tc * th);
}

}  // namespace tessera
