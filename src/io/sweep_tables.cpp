#include "io/sweep_tables.hpp"

#include <cstdio>
#include <cstdlib>

#include "core/number_text.hpp"

namespace tessera {

namespace {

void append_prefix(std::string& out, std::size_t point, const char* source, int replicate) {
    out += std::to_string(point);
    out += ',';
    out += source;
    out += ',';
    out += std::to_string(replicate);
    out += ',';
}

}  // namespace

std::string csv_field(const std::string& text) {
    if (text.find_first_of(",\"\n\r") == std::string::npos) return text;
    std::string out = "\"";
    for (char c : text) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

std::string points_header(const ParameterGrid& grid) {
    std::string out = "point";
    for (const GridAxis& a : grid.axes()) out += "," + csv_field(a.key);
    return out + "\n";
}

std::string points_row(const ParameterGrid& grid, std::size_t point) {
    std::string out = std::to_string(point);
    for (const std::string& v : grid.values(point)) out += "," + csv_field(v);
    return out + "\n";
}

std::string outcomes_header() { return "point,source,replicate,regime,residents,period,final_t_logK\n"; }

void append_outcome_row(std::string& out, std::size_t point, const char* source, int replicate, const Outcome& o,
                        const std::vector<std::string>& names) {
    append_prefix(out, point, source, replicate);
    out += name_of(o.regime);
    out += ',';
    out += residents_text(o.residents, names);
    out += ',';
    if (o.regime == Regime::cycling && o.period) append_number(out, *o.period);
    out += ',';
    append_time(out, o.final_t_logK);
    out += '\n';
}

std::string final_exponents_header() { return "point,source,replicate,dormancy,transfer,exponent\n"; }

void append_final_exponent_rows(std::string& out, std::size_t point, const char* source, int replicate,
                                const std::vector<double>& exponents, const TraitGrid& traits) {
    for (int i = 0; i < traits.size() && i < static_cast<int>(exponents.size()); ++i) {
        append_prefix(out, point, source, replicate);
        append_number(out, traits.dormancy(i));
        out += ',';
        append_number(out, traits.transfer(i));
        out += ',';
        append_number(out, exponents[static_cast<std::size_t>(i)]);
        out += '\n';
    }
}

std::string summary_header() { return "point,source,replicates,kind,name,fraction,wilson_low,wilson_high\n"; }

void append_summary_rows(std::string& out, std::size_t point, const char* source, const std::vector<SummaryRow>& rows) {
    for (const SummaryRow& r : rows) {
        out += std::to_string(point);
        out += ',';
        out += source;
        out += ',';
        out += std::to_string(r.replicates);
        out += ',';
        out += r.kind;
        out += ',';
        out += r.name;
        out += ',';
        append_number(out, r.fraction);
        out += ',';
        append_number(out, r.interval.low);
        out += ',';
        append_number(out, r.interval.high);
        out += '\n';
    }
}

}  // namespace tessera
