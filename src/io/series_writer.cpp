#include "io/series_writer.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "core/exponent_scale.hpp"
#include "core/number_text.hpp"

namespace tessera {

std::string series_header() {
    return "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent,exponent_per_patch\n";
}
std::string habitat_series_header() {
    return "replicate,t,t_logK,habitat,dormancy,transfer,active,dormant,exponent_per_patch\n";
}

double habitable_patches(const Scenario& scenario, int habitat_class) {
    return capacity_weighted_patches(scenario, habitat_class);
}

namespace {

// Totals over patches: each patch holds fewer than 2^62 cells (core/count_limit.hpp), but
// a lattice of them can hold more than 2^63, so they are summed and written in 128 bits.
__extension__ using wide = __int128;

void append_count(std::string& out, wide v) {
    if (v < 0) {
        out += '-';
        v = -v;
    }
    char digits[48];
    int n = 0;
    do {
        digits[n++] = static_cast<char>('0' + static_cast<int>(v % 10));
        v /= 10;
    } while (v > 0);
    while (n > 0) out += digits[--n];
}

// Real counts (the deterministic model) are written as numbers.
void append_count(std::string& out, double v) { append_number(out, v); }

// Per-trait totals over the patches of one class (class < 0: every patch), in patch order;
// counts laid out [patch][trait].
template <class Sum, class Count>
void sum_counts(const Scenario& s, int T, const std::vector<Count>& all_active, const std::vector<Count>& all_dormant,
                int habitat_class, std::vector<Sum>& active, std::vector<Sum>& dormant) {
    active.assign(static_cast<std::size_t>(T), 0);
    dormant.assign(static_cast<std::size_t>(T), 0);
    const std::size_t patches = all_active.size() / static_cast<std::size_t>(T);
    for (std::size_t p = 0; p < patches; ++p) {
        if (habitat_class >= 0 && s.habitat_of_patch[p] != habitat_class) continue;
        const Count* a = all_active.data() + p * T;
        const Count* d = all_dormant.data() + p * T;
        for (int i = 0; i < T; ++i) {
            active[i] += a[i];
            dormant[i] += d[i];
        }
    }
}

// What every row of one output time shares.
struct RowTime {
    std::uint32_t replicate;
    double t, t_logK;
};

// The rows of one output time, lattice totals (habitat == nullptr, with `exponent`) or one
// class's totals: "replicate,t,t_logK,[habitat,]dormancy,transfer,active,dormant,
// [exponent,]exponent_per_patch". P: habitable_patches of the same patches.
template <class Sum>
void append_rows(std::string& out, const Scenario& s, const TraitGrid& traits, const RowTime& when,
                 const std::string* habitat, const std::vector<Sum>& active, const std::vector<Sum>& dormant, double P) {
    const double log_K = std::log(s.K);
    for (int i = 0; i < traits.size(); ++i) {
        out += std::to_string(when.replicate);
        out += ',';
        append_time(out, when.t);
        out += ',';
        append_time(out, when.t_logK);
        out += ',';
        if (habitat) {
            out += *habitat;
            out += ',';
        }
        append_number(out, traits.dormancy(i));
        out += ',';
        append_number(out, traits.transfer(i));
        out += ',';
        append_count(out, active[i]);
        out += ',';
        append_count(out, dormant[i]);
        const double total = static_cast<double>(active[i] + dormant[i]);
        if (!habitat) {
            out += ',';
            append_number(out, std::log1p(total) / log_K);
        }
        out += ',';
        append_number(out, P > 0 ? std::log1p(total / P) / log_K : 0.0);
        out += '\n';
    }
}

template <class Sum, class Count>
void lattice_rows(std::string& out, const Scenario& s, const TraitGrid& traits, const RowTime& when,
                  const std::vector<Count>& all_active, const std::vector<Count>& all_dormant) {
    std::vector<Sum> active, dormant;
    sum_counts(s, traits.size(), all_active, all_dormant, -1, active, dormant);
    append_rows(out, s, traits, when, nullptr, active, dormant, habitable_patches(s, -1));
}

template <class Sum, class Count>
void habitat_rows(std::string& out, const Scenario& s, const TraitGrid& traits, const RowTime& when,
                  const std::vector<Count>& all_active, const std::vector<Count>& all_dormant) {
    std::vector<Sum> active, dormant;
    for (std::size_t c = 0; c < s.habitats.size(); ++c) {
        const int cls = static_cast<int>(c);
        sum_counts(s, traits.size(), all_active, all_dormant, cls, active, dormant);
        append_rows(out, s, traits, when, &s.habitats[c].name, active, dormant, habitable_patches(s, cls));
    }
}

RowTime row_time(const Engine& e) { return {e.replicate(), e.time(), e.time_logK()}; }

}  // namespace

void append_series_rows(const Engine& engine, std::string& out) {
    lattice_rows<wide>(out, engine.scenario(), engine.traits(), row_time(engine), engine.lattice().all_active(),
                       engine.lattice().all_dormant());
}

void append_habitat_series_rows(const Engine& engine, std::string& out) {
    habitat_rows<wide>(out, engine.scenario(), engine.traits(), row_time(engine), engine.lattice().all_active(),
                       engine.lattice().all_dormant());
}

void append_series_rows(const RealCounts& c, std::string& out) {
    lattice_rows<double>(out, c.scenario, c.traits, {c.replicate, c.t, c.t_logK}, c.active, c.dormant);
}

void append_habitat_series_rows(const RealCounts& c, std::string& out) {
    habitat_rows<double>(out, c.scenario, c.traits, {c.replicate, c.t, c.t_logK}, c.active, c.dormant);
}

}  // namespace tessera
