#include "io/series_writer.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

namespace tessera {

std::string series_header() { return "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent\n"; }

namespace {

// Shortest text that reads back to the same double.
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

}  // namespace

void append_series_rows(const Engine& engine, std::string& out) {
    const Lattice& lattice = engine.lattice();
    const TraitGrid& traits = engine.traits();
    const int T = traits.size();
    std::vector<std::int64_t> active(T, 0), dormant(T, 0);
    for (std::size_t p = 0; p < lattice.patches(); ++p) {
        const std::int64_t* a = lattice.active(p);
        const std::int64_t* d = lattice.dormant(p);
        for (int i = 0; i < T; ++i) {
            active[i] += a[i];
            dormant[i] += d[i];
        }
    }
    const double log_K = std::log(engine.scenario().K);
    const std::string prefix = std::to_string(engine.replicate()) + ",";
    for (int i = 0; i < T; ++i) {
        out += prefix;
        append_number(out, engine.time());
        out += ',';
        append_number(out, engine.time_logK());
        out += ',';
        append_number(out, traits.dormancy(i));
        out += ',';
        append_number(out, traits.transfer(i));
        out += ',';
        out += std::to_string(active[i]);
        out += ',';
        out += std::to_string(dormant[i]);
        out += ',';
        append_number(out, std::log1p(static_cast<double>(active[i] + dormant[i])) / log_K);
        out += '\n';
    }
}

}  // namespace tessera
