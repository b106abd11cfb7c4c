#include "io/scenario_findings.hpp"

#include <algorithm>

namespace tessera::scenario_io {

Place place_of(const toml::source_region& region) {
    // Only nodes parsed from the scenario text carry a path; nodes that --set inserted
    // (copies, or tables made to hold them) carry none.
    if (!region.path || *region.path == set_file) return {std::string(set_file), 0};
    return {*region.path, static_cast<int>(region.begin.line)};
}

Place Findings::place(std::string_view key) const {
    std::string k(key);
    while (!k.empty()) {
        auto it = places_.find(k);
        if (it != places_.end()) return it->second;
        const auto cut = k.find_last_of(".[");
        if (cut == std::string::npos) break;
        k.resize(cut);
    }
    return {file_, 0};
}

Place Findings::place_any(std::initializer_list<std::string_view> keys) const {
    for (std::string_view k : keys)
        if (has(k)) return place(k);
    return place(*keys.begin());
}

void Findings::add(Place place, std::string key, std::string message) {
    diagnostics_.push_back({std::move(place.file), place.line, std::move(key), std::move(message)});
}

std::vector<Diagnostic> Findings::sorted() const {
    std::vector<Diagnostic> out = diagnostics_;
    std::stable_sort(out.begin(), out.end(), [&](const Diagnostic& a, const Diagnostic& b) {
        auto rank = [&](const Diagnostic& d) { return d.file == set_file ? 2 : d.file == file_ ? 0 : 1; };
        if (rank(a) != rank(b)) return rank(a) < rank(b);
        if (a.file != b.file) return a.file < b.file;
        return a.line < b.line;
    });
    return out;
}

}  // namespace tessera::scenario_io
