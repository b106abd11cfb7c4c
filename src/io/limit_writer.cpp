#include "io/limit_writer.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

#include "core/number_text.hpp"

namespace tessera {

namespace {

// Exponents with 10 significant digits, and 0 below 1e-10: the event arithmetic leaves
// rounding of order 1e-12 (a phase of length exactly 1 may end at 0.999999999998), which is
// not information; the limit is promised to 1e-3.
void append_exponent(std::string& out, double e) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.10g", std::fabs(e) < 1e-10 ? 0.0 : e);
    out += buf;
}

}  // namespace

std::string limit_series_header() { return "t_logK,dormancy,transfer,exponent\n"; }
std::string limit_phases_header() {
    return "phase,start_t_logK,end_t_logK,end,dormancy,transfer,active_density,dormant_density\n";
}

std::string limit_series_rows(const LimitPrediction& p, const TraitGrid& traits, double every, double until) {
    // Output times as the engine's: multiples of `every` (a margin of rounding lets the last
    // multiple land on `until`), then `until` when it is not one.
    const double margin = 1e-9 * std::max(1.0, until);
    std::vector<double> times;
    if (every > 0) {
        for (double j = 0;; ++j) {
            const double s = j * every;
            if (s > until + margin) break;
            times.push_back(std::min(s, until));
        }
    }
    if (times.empty() || times.back() < until - margin) times.push_back(until);
    std::string out;
    for (double s : times) {
        if (s > p.stopped_at + margin) break;
        const double at = std::min(s, p.stopped_at);
        for (int i = 0; i < traits.size(); ++i) {
            append_time(out, s);
            out += ',';
            append_number(out, traits.dormancy(i));
            out += ',';
            append_number(out, traits.transfer(i));
            out += ',';
            append_exponent(out, p.exponent_at(i, at));
            out += '\n';
        }
    }
    return out;
}

std::string limit_phases_rows(const LimitPrediction& p, const TraitGrid& traits) {
    std::string out;
    for (std::size_t k = 0; k < p.phases.size(); ++k) {
        const LimitPhase& phase = p.phases[k];
        auto prefix = [&] {
            out += std::to_string(k);
            out += ',';
            append_time(out, phase.start_t_logK);
            out += ',';
            append_time(out, phase.end_t_logK);
            out += ',';
            out += name_of(phase.end);
            out += ',';
        };
        if (phase.residents.empty()) {
            prefix();
            out += ",,,\n";
            continue;
        }
        for (const ResidentState& r : phase.residents) {
            prefix();
            append_number(out, traits.dormancy(r.trait));
            out += ',';
            append_number(out, traits.transfer(r.trait));
            out += ',';
            append_time(out, r.active_density);
            out += ',';
            append_time(out, r.dormant_density);
            out += '\n';
        }
    }
    return out;
}

}  // namespace tessera
