// Step 1 of loading: `--set key=value` overrides, written into the parsed table before it is
// read, so that an override meets exactly the checks a value in the file meets.
#include <cstdint>
#include <optional>
#include <string_view>

#include "io/scenario_findings.hpp"
#include "io/text_help.hpp"

namespace tessera::scenario_io {

namespace {

std::string trim(std::string_view s) {
    while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
    while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
    return std::string(s);
}

struct Segment {
    std::string name;
    std::optional<std::size_t> entry;  // from 1, for arrays of tables: habitat[2]
};

std::optional<std::vector<Segment>> split_key(const std::string& key) {
    std::vector<Segment> out;
    std::size_t pos = 0;
    while (pos <= key.size()) {
        std::size_t dot = key.find('.', pos);
        std::string part = key.substr(pos, dot == std::string::npos ? std::string::npos : dot - pos);
        Segment seg;
        if (auto open = part.find('['); open != std::string::npos) {
            if (part.back() != ']' || open + 2 > part.size() - 1) return std::nullopt;
            const std::string number = part.substr(open + 1, part.size() - open - 2);
            if (number.empty() || number.find_first_not_of("0123456789") != std::string::npos || number.size() > 9)
                return std::nullopt;
            seg.entry = std::stoul(number);
            part.resize(open);
        }
        if (part.empty()) return std::nullopt;
        seg.name = part;
        out.push_back(seg);
        if (dot == std::string::npos) break;
        pos = dot + 1;
    }
    return out;
}

// The value as TOML ("0", "1e5", "\"exact\"", "[4.0, 0.0]", "true"); anything that is not a
// TOML value is taken as a bare string, so `run.method=exact` works without shell quoting.
toml::table parse_value(const std::string& text) {
    try {
        toml::table t = toml::parse("value = " + text, std::string(set_file));
        if (t.size() == 1 && t.contains("value")) return t;
    } catch (const toml::parse_error&) {
    }
    toml::table t;
    t.insert("value", text);
    return t;
}

// Whether `s` is well-formed UTF-8 (RFC 3629: no overlongs, no surrogates, at most U+10FFFF).
// A scenario file is TOML, which must be UTF-8; a value that is not would be kept here but
// refused when the resolved file is read back (found by fuzz_scenario).
bool valid_utf8(std::string_view s) {
    std::size_t i = 0;
    while (i < s.size()) {
        const auto c = static_cast<unsigned char>(s[i]);
        int n = 0;
        std::uint32_t cp = 0;
        if (c < 0x80) {
            ++i;
            continue;
        } else if (c >= 0xc2 && c <= 0xdf) {
            n = 1;
            cp = c & 0x1f;
        } else if (c >= 0xe0 && c <= 0xef) {
            n = 2;
            cp = c & 0x0f;
        } else if (c >= 0xf0 && c <= 0xf4) {
            n = 3;
            cp = c & 0x07;
        } else {
            return false;
        }
        if (i + static_cast<std::size_t>(n) >= s.size()) return false;  // cut short
        for (int k = 1; k <= n; ++k) {
            const auto d = static_cast<unsigned char>(s[i + k]);
            if ((d & 0xc0) != 0x80) return false;
            cp = (cp << 6) | (d & 0x3f);
        }
        if ((n == 2 && cp < 0x800) || (n == 3 && cp < 0x10000) || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff))
            return false;
        i += static_cast<std::size_t>(n) + 1;
    }
    return true;
}

}  // namespace

void apply_overrides(toml::table& root, const std::vector<std::string>& overrides, Findings& f) {
    const Place here{std::string(set_file), 0};
    const std::string accepted = "KEY=VALUE with a dotted key of the scenario file, e.g. rates.transfer=0 or "
                                 "habitat[2].stress=3 (entries counted from 1)";
    for (const std::string& o : overrides) {
        if (!valid_utf8(o)) {
            f.add(here, "", "an override is not valid UTF-8 text; accepted: " + accepted);
            continue;
        }
        const auto eq = o.find('=');
        if (eq == std::string::npos) {
            f.add(here, o, "has no '='; accepted: " + accepted);
            continue;
        }
        const std::string key = trim(std::string_view(o).substr(0, eq));
        auto segments = split_key(key);
        if (!segments || segments->back().entry) {
            f.add(here, key, "cannot read this key; accepted: " + accepted);
            continue;
        }
        toml::table* at = &root;
        std::string walked;
        bool ok = true;
        for (std::size_t i = 0; i + 1 < segments->size() && ok; ++i) {
            const Segment& seg = (*segments)[i];
            walked += (walked.empty() ? "" : ".") + seg.name;
            toml::node* n = at->get(seg.name);
            if (!seg.entry) {
                if (!n) n = at->insert(seg.name, toml::table{}).first->second.as_table();
                if (!n->is_table()) {
                    f.add(here, key, walked + " is not a table; accepted: " + accepted);
                    ok = false;
                    break;
                }
                at = n->as_table();
                continue;
            }
            toml::array* arr = n ? n->as_array() : nullptr;
            const std::size_t have = arr ? arr->size() : 0;
            if (*seg.entry < 1 || *seg.entry > have || !(*arr)[*seg.entry - 1].is_table()) {
                f.add(here, key, "there is no " + walked + "[" + std::to_string(*seg.entry) + "]; the file has " +
                                     std::to_string(have) + " [[" + walked + "]] entries; accepted: an entry from 1 to " +
                                     std::to_string(have));
                ok = false;
                break;
            }
            at = (*arr)[*seg.entry - 1].as_table();
            walked += '[';
            walked += std::to_string(*seg.entry);
            walked += ']';
        }
        if (!ok) continue;
        toml::table parsed = parse_value(trim(std::string_view(o).substr(eq + 1)));
        const std::string& last = segments->back().name;
        parsed.get("value")->visit([&](auto&& v) { at->insert_or_assign(last, v); });
    }
}

}  // namespace tessera::scenario_io
