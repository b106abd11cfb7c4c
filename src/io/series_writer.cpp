#include "io/series_writer.hpp"

#include "io/number_text.hpp"

#include <cmath>
#include <vector>

namespace tessera {

std::string series_header() { return "replicate,t,t_logK,dormancy,transfer,active,dormant,exponent\n"; }
std::string habitat_series_header() { return "replicate,t,t_logK,habitat,dormancy,transfer,active,dormant\n"; }

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

// Per-trait totals over the patches of one class (class < 0: every patch), in patch order.
void sum_counts(const Engine& engine, int habitat_class, std::vector<wide>& active, std::vector<wide>& dormant) {
    const Lattice& lattice = engine.lattice();
    const int T = lattice.traits();
    active.assign(static_cast<std::size_t>(T), 0);
    dormant.assign(static_cast<std::size_t>(T), 0);
    for (std::size_t p = 0; p < lattice.patches(); ++p) {
        if (habitat_class >= 0 && engine.scenario().habitat_of_patch[p] != habitat_class) continue;
        const std::int64_t* a = lattice.active(p);
        const std::int64_t* d = lattice.dormant(p);
        for (int i = 0; i < T; ++i) {
            active[i] += a[i];
            dormant[i] += d[i];
        }
    }
}

// "replicate,t,t_logK,"
void append_time_prefix(const Engine& engine, std::string& out) {
    out += std::to_string(engine.replicate());
    out += ',';
    append_time(out, engine.time());
    out += ',';
    append_time(out, engine.time_logK());
    out += ',';
}

// "dormancy,transfer,active,dormant" of trait i.
void append_trait_counts(std::string& out, const TraitGrid& traits, int i, wide active, wide dormant) {
    append_number(out, traits.dormancy(i));
    out += ',';
    append_number(out, traits.transfer(i));
    out += ',';
    append_count(out, active);
    out += ',';
    append_count(out, dormant);
}

}  // namespace

void append_series_rows(const Engine& engine, std::string& out) {
    const TraitGrid& traits = engine.traits();
    const int T = traits.size();
    std::vector<wide> active, dormant;
    sum_counts(engine, -1, active, dormant);
    const double log_K = std::log(engine.scenario().K);
    for (int i = 0; i < T; ++i) {
        append_time_prefix(engine, out);
        append_trait_counts(out, traits, i, active[i], dormant[i]);
        out += ',';
        append_number(out, std::log1p(static_cast<double>(active[i] + dormant[i])) / log_K);
        out += '\n';
    }
}

void append_habitat_series_rows(const Engine& engine, std::string& out) {
    const TraitGrid& traits = engine.traits();
    std::vector<wide> active, dormant;
    const auto& habitats = engine.scenario().habitats;
    for (std::size_t c = 0; c < habitats.size(); ++c) {
        sum_counts(engine, static_cast<int>(c), active, dormant);
        for (int i = 0; i < traits.size(); ++i) {
            append_time_prefix(engine, out);
            out += habitats[c].name;
            out += ',';
            append_trait_counts(out, traits, i, active[i], dormant[i]);
            out += '\n';
        }
    }
}

}  // namespace tessera
