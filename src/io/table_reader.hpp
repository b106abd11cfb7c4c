// Reads one TOML table of a scenario: typed values with range checks, unknown keys reported
// with a "did you mean", and the place of every value remembered in the Findings.
#pragma once

#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "io/scenario_findings.hpp"

namespace tessera::scenario_io {

// The values a number key accepts, and how to say so in a message.
struct Bounds {
    double lo = -std::numeric_limits<double>::infinity();
    double hi = std::numeric_limits<double>::infinity();
    bool lo_open = false;   // lo itself is not accepted
    bool allow_inf = false; // +inf is accepted (beyond hi)
    std::string accepted;
    bool hi_open = false;   // hi itself is not accepted

    static Bounds non_negative() { return {0.0, std::numeric_limits<double>::infinity(), false, false, "a finite number >= 0"}; }
    static Bounds positive() { return {0.0, std::numeric_limits<double>::infinity(), true, false, "a finite number > 0"}; }
    static Bounds probability() { return {0.0, 1.0, false, false, "a number from 0 to 1"}; }
};

// A short description of a node's type and value for messages: `string "abc"`, `integer 3`.
std::string describe(const toml::node& node);

// The message for `v` outside `b`, or "" when v is accepted.
std::string bounds_problem(double v, const Bounds& b);

class TableReader {
public:
    // `table` may be null (absent from the file): every read then keeps its default.
    // Keys of `table` not in `allowed` are reported at once.
    TableReader(const toml::table* table, std::string prefix, const std::vector<std::string>& allowed,
                Findings& findings);

    std::string path(std::string_view key) const;
    bool has(std::string_view key) const { return table_ && table_->contains(key); }

    // Each read leaves `out` unchanged when the key is absent or its value is rejected, and
    // returns whether it stored a value.
    bool number(std::string_view key, double& out, const Bounds& bounds);
    bool number(std::string_view key, std::optional<double>& out, const Bounds& bounds);
    bool integer(std::string_view key, std::int64_t& out, std::int64_t lo, std::int64_t hi,
                 std::string_view accepted);
    template <class Int>
    bool integer(std::string_view key, Int& out, std::int64_t lo, std::int64_t hi, std::string_view accepted) {
        std::int64_t v = 0;
        if (!integer(key, v, lo, hi, accepted)) return false;
        out = static_cast<Int>(v);
        return true;
    }
    bool boolean(std::string_view key, bool& out);
    bool text(std::string_view key, std::string& out);
    template <class E>
    bool choice(std::string_view key, E& out, const std::vector<std::pair<std::string, E>>& options) {
        std::string word;
        if (!text(key, word)) return false;
        for (const auto& [name, value] : options)
            if (name == word) {
                out = value;
                return true;
            }
        std::vector<std::string> names;
        for (const auto& o : options) names.push_back(o.first);
        report_bad_choice(key, word, names);
        return false;
    }
    // A pair of numbers `[a, b]` (trait coordinates).
    bool pair(std::string_view key, double& a, double& b, std::string_view accepted);

    // A sub-table (a [section] or an inline table); null when absent or not a table.
    const toml::table* table(std::string_view key, std::string_view accepted);
    // An array of tables ([[name]]); entries that are not tables are reported and skipped
    // (their slot holds null so that entry numbers stay as written).
    std::vector<const toml::table*> array_of_tables(std::string_view key);

    void report(std::string_view key, std::string message);

private:
    const toml::node* get(std::string_view key);
    void report_bad_choice(std::string_view key, const std::string& word, const std::vector<std::string>& names);

    const toml::table* table_;
    std::string prefix_;
    Findings& findings_;
};

}  // namespace tessera::scenario_io
