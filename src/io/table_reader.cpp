#include "io/table_reader.hpp"

#include <cmath>

#include "io/text_help.hpp"

namespace tessera::scenario_io {

std::string describe(const toml::node& node) {
    switch (node.type()) {
        case toml::node_type::string: return "string " + toml_string(*node.value<std::string>());
        case toml::node_type::integer: return "integer " + std::to_string(*node.value<std::int64_t>());
        case toml::node_type::floating_point: return "float " + format_number(*node.value<double>());
        case toml::node_type::boolean: return *node.value<bool>() ? "boolean true" : "boolean false";
        case toml::node_type::table: return "a table";
        case toml::node_type::array: return "an array";
        default: return "a date or time";
    }
}

std::string bounds_problem(double v, const Bounds& b) {
    if (std::isnan(v)) return "must be a number, got nan";
    if (std::isinf(v) && !(b.allow_inf && v > 0)) return "must be finite, got " + format_number(v);
    if (std::isinf(v)) return "";
    if (v < b.lo || (b.lo_open && v == b.lo))
        return std::string("must be ") + (b.lo_open ? "> " : ">= ") + format_number(b.lo) + ", got " + format_number(v);
    if (v > b.hi || (b.hi_open && v == b.hi))
        return std::string("must be ") + (b.hi_open ? "< " : "<= ") + format_number(b.hi) + ", got " + format_number(v);
    return "";
}

TableReader::TableReader(const toml::table* table, std::string prefix, const std::vector<std::string>& allowed,
                         Findings& findings)
    : table_(table), prefix_(std::move(prefix)), findings_(findings) {
    if (!table_) return;
    if (!prefix_.empty()) findings_.remember(prefix_, place_of(table_->source()));
    for (auto&& [k, v] : *table_) {
        const std::string name(k.str());
        bool known = false;
        for (const std::string& a : allowed) known = known || a == name;
        if (known) continue;
        // A key's own place is the best line; a key inserted by --set has none.
        Place at = place_of(k.source());
        if (at.line == 0 && at.file != set_file) at = place_of(v.source());
        const std::string suggestion = closest_match(name, allowed);
        std::string message = "unknown key";
        if (!suggestion.empty())
            message += "; did you mean " + path(suggestion) + "?";
        else
            message += "; accepted here: " + join_list(allowed);
        findings_.add(at, path(name), message);
    }
}

std::string TableReader::path(std::string_view key) const {
    return prefix_.empty() ? std::string(key) : prefix_ + "." + std::string(key);
}

const toml::node* TableReader::get(std::string_view key) {
    if (!table_) return nullptr;
    const toml::node* n = table_->get(key);
    if (n) findings_.remember(path(key), place_of(n->source()));
    return n;
}

void TableReader::report(std::string_view key, std::string message) {
    findings_.add(path(key), std::move(message));
}

bool TableReader::number(std::string_view key, double& out, const Bounds& bounds) {
    const toml::node* n = get(key);
    if (!n) return false;
    if (!n->is_number()) {
        report(key, "must be a number, got " + describe(*n) + "; accepted: " + bounds.accepted);
        return false;
    }
    // toml++ converts an integer to double only when every integer near it is exact in a
    // double (|v| <= 2^53), so large integers are converted here, rounding to nearest.
    const double v = n->is_integer() ? static_cast<double>(*n->value<std::int64_t>()) : *n->value<double>();
    const std::string problem = bounds_problem(v, bounds);
    if (!problem.empty()) {
        report(key, problem + "; accepted: " + bounds.accepted);
        return false;
    }
    out = v;
    return true;
}

bool TableReader::number(std::string_view key, std::optional<double>& out, const Bounds& bounds) {
    double v = 0.0;
    if (!number(key, v, bounds)) return false;
    out = v;
    return true;
}

bool TableReader::integer(std::string_view key, std::int64_t& out, std::int64_t lo, std::int64_t hi,
                          std::string_view accepted) {
    const toml::node* n = get(key);
    if (!n) return false;
    std::int64_t v = 0;
    if (n->is_integer()) {
        v = *n->value<std::int64_t>();
    } else if (n->is_floating_point()) {
        // A float with no fraction ("5.0", "1e3") is accepted: it says the same number.
        const double d = *n->value<double>();
        if (!std::isfinite(d) || d != std::floor(d) || std::fabs(d) > 9.2e18) {
            report(key, "must be a whole number, got " + format_number(d) + "; accepted: " + std::string(accepted));
            return false;
        }
        v = static_cast<std::int64_t>(d);
    } else {
        report(key, "must be an integer, got " + describe(*n) + "; accepted: " + std::string(accepted));
        return false;
    }
    if (v < lo || v > hi) {
        report(key, (v < lo ? "must be >= " + std::to_string(lo) : "must be <= " + std::to_string(hi)) + ", got " +
                        std::to_string(v) + "; accepted: " + std::string(accepted));
        return false;
    }
    out = v;
    return true;
}

bool TableReader::boolean(std::string_view key, bool& out) {
    const toml::node* n = get(key);
    if (!n) return false;
    if (!n->is_boolean()) {
        report(key, "must be true or false, got " + describe(*n) + "; accepted: true or false");
        return false;
    }
    out = *n->value<bool>();
    return true;
}

bool TableReader::text(std::string_view key, std::string& out) {
    const toml::node* n = get(key);
    if (!n) return false;
    if (!n->is_string()) {
        report(key, "must be a string, got " + describe(*n) + "; accepted: a quoted string");
        return false;
    }
    out = *n->value<std::string>();
    return true;
}

void TableReader::report_bad_choice(std::string_view key, const std::string& word,
                                    const std::vector<std::string>& names) {
    std::vector<std::string> quoted;
    for (const auto& n : names) quoted.push_back(toml_string(n));
    const std::string suggestion = closest_match(word, names);
    std::string message = "unknown value " + toml_string(word);
    if (!suggestion.empty()) message += " (did you mean " + toml_string(suggestion) + "?)";
    // "a", "b" or "c"
    std::string choices = quoted.back();
    if (quoted.size() > 1) {
        quoted.pop_back();
        choices = join_list(quoted) + " or " + choices;
    }
    report(key, message + "; accepted: " + choices);
}

bool TableReader::pair(std::string_view key, double& a, double& b, std::string_view accepted) {
    const toml::node* n = get(key);
    if (!n) return false;
    const toml::array* arr = n->as_array();
    if (!arr || arr->size() != 2 || !(*arr)[0].is_number() || !(*arr)[1].is_number()) {
        report(key, "must be a pair of numbers [x, y], got " +
                        (arr ? "an array of " + std::to_string(arr->size()) + " values" : describe(*n)) +
                        "; accepted: " + std::string(accepted));
        return false;
    }
    const double x = *(*arr)[0].value<double>(), y = *(*arr)[1].value<double>();
    if (!std::isfinite(x) || !std::isfinite(y)) {
        report(key, "must be finite, got [" + format_number(x) + ", " + format_number(y) + "]; accepted: " +
                        std::string(accepted));
        return false;
    }
    a = x;
    b = y;
    return true;
}

const toml::table* TableReader::table(std::string_view key, std::string_view accepted) {
    const toml::node* n = get(key);
    if (!n) return nullptr;
    if (!n->is_table()) {
        report(key, "must be a table, got " + describe(*n) + "; accepted: " + std::string(accepted));
        return nullptr;
    }
    return n->as_table();
}

std::vector<const toml::table*> TableReader::array_of_tables(std::string_view key) {
    std::vector<const toml::table*> out;
    const toml::node* n = get(key);
    if (!n) return out;
    const toml::array* arr = n->as_array();
    if (!arr) {
        report(key, "must be an array of tables, got " + describe(*n) + "; accepted: entries written [[" +
                        path(key) + "]]");
        return out;
    }
    for (std::size_t i = 0; i < arr->size(); ++i) {
        const toml::table* t = (*arr)[i].as_table();
        if (!t) {
            const std::string entry = std::string(key) + "[" + std::to_string(i + 1) + "]";
            findings_.add(place_of((*arr)[i].source()), path(entry),
                          "must be a table, got " + describe((*arr)[i]) + "; accepted: entries written [[" +
                              path(key) + "]]");
        }
        out.push_back(t);
    }
    return out;
}

}  // namespace tessera::scenario_io
