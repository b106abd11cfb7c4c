#include "core/number_text.hpp"

#include <cstdio>
#include <cstdlib>

namespace tessera {

void append_number(std::string& out, double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    // Prefer a shorter spelling when it is exact (most times and trait levels are).
    for (int precision = 6; precision < 17; ++precision) {
        char shorter[32];
        std::snprintf(shorter, sizeof shorter, "%.*g", precision, v);
        if (std::strtod(shorter, nullptr) == v) {
            out += shorter;
            return;
        }
    }
    out += buf;
}

std::string shortest_text(double v) {
    std::string out;
    append_number(out, v);
    return out;
}

void append_time(std::string& out, double t) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.12g", t);
    out += buf;
}

}  // namespace tessera
