#include "io/text_help.hpp"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>

namespace tessera {

int edit_distance(std::string_view a, std::string_view b) {
    auto lower = [](char c) { return static_cast<char>(std::tolower(static_cast<unsigned char>(c))); };
    const std::size_t n = a.size(), m = b.size();
    // Three rows suffice for the swap of neighbours (optimal string alignment distance).
    std::vector<int> prev2(m + 1), prev(m + 1), cur(m + 1);
    for (std::size_t j = 0; j <= m; ++j) prev[j] = static_cast<int>(j);
    for (std::size_t i = 1; i <= n; ++i) {
        cur[0] = static_cast<int>(i);
        for (std::size_t j = 1; j <= m; ++j) {
            const int cost = lower(a[i - 1]) == lower(b[j - 1]) ? 0 : 1;
            cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost});
            if (i > 1 && j > 1 && lower(a[i - 1]) == lower(b[j - 2]) && lower(a[i - 2]) == lower(b[j - 1]))
                cur[j] = std::min(cur[j], prev2[j - 2] + 1);
        }
        std::swap(prev2, prev);
        std::swap(prev, cur);
    }
    return prev[m];
}

std::string closest_match(std::string_view word, const std::vector<std::string>& candidates) {
    std::string best;
    int best_distance = 0;
    for (const std::string& c : candidates) {
        int d = edit_distance(word, c);
        // A word that is the start of a longer key ("birth_cost" for "birth_cost_dormancy") is
        // a likely abbreviation, whatever the length difference.
        const bool prefix = word.size() >= 3 && c.size() > word.size() && edit_distance(word, c.substr(0, word.size())) == 0;
        if (prefix) d = std::min(d, 1);
        const int limit = std::max<int>(2, static_cast<int>(std::max(word.size(), c.size())) / 3);
        if (d > limit) continue;
        if (best.empty() || d < best_distance) {
            best = c;
            best_distance = d;
        }
    }
    return best;
}

std::string join_list(const std::vector<std::string>& items, std::string_view separator) {
    std::string out;
    for (std::size_t i = 0; i < items.size(); ++i) {
        if (i) out += separator;
        out += items[i];
    }
    return out;
}

std::string format_number(double v) {
    if (std::isnan(v)) return "nan";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buf[64];
    auto r = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, r.ptr);
}

std::string toml_number(double v) {
    std::string s = format_number(v);
    if (s == "nan" || s == "inf" || s == "-inf") return s;
    if (s.find_first_of(".eE") == std::string::npos) s += ".0";
    return s;
}

std::string toml_string(std::string_view s) {
    std::string out = "\"";
    for (char c : s) {
        switch (c) {
            case '"': out += "\\\""; break;
            case '\\': out += "\\\\"; break;
            case '\n': out += "\\n"; break;
            case '\t': out += "\\t"; break;
            case '\r': out += "\\r"; break;
            default:
                if (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) {
                    char buf[8];
                    std::snprintf(buf, sizeof buf, "\\u%04x", static_cast<unsigned>(static_cast<unsigned char>(c)));
                    out += buf;
                } else {
                    out += c;
                }
        }
    }
    out += '"';
    return out;
}

}  // namespace tessera
