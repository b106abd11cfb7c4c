#include "cli/sweep_manifest.hpp"

#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include "core/number_text.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {


// key=value lines of `file`; repeated keys keep every value in order.
std::vector<std::pair<std::string, std::string>> read_pairs(const fs::path& file) {
    std::ifstream in(file, std::ios::binary);
    if (!in) throw std::runtime_error(file.string() + ": cannot be read");
    std::vector<std::pair<std::string, std::string>> out;
    std::string line;
    int n = 0;
    while (std::getline(in, line)) {
        ++n;
        if (line.empty() || line[0] == '#') continue;
        const std::size_t eq = line.find('=');
        if (eq == std::string::npos) throw std::runtime_error(file.string() + ":" + std::to_string(n) + ": expected key=value");
        out.emplace_back(line.substr(0, eq), line.substr(eq + 1));
    }
    return out;
}

std::uint64_t to_u64(const fs::path& file, const std::string& key, const std::string& v, int base = 10) {
    char* end = nullptr;
    const unsigned long long x = std::strtoull(v.c_str(), &end, base);
    if (v.empty() || *end) throw std::runtime_error(file.string() + ": " + key + ": '" + v + "' is not a whole number");
    return x;
}

bool write_durably(const fs::path& file, const std::string& text, bool sync = true) {
    const fs::path temporary = file.string() + ".tmp";
    std::FILE* f = std::fopen(temporary.c_str(), "wb");
    if (!f) return false;
    bool ok = std::fwrite(text.data(), 1, text.size(), f) == text.size() && std::fflush(f) == 0 && (!sync || ::fsync(fileno(f)) == 0);
    ok = std::fclose(f) == 0 && ok;
    if (!ok) return false;
    std::error_code ec;
    fs::rename(temporary, file, ec);
    return !ec;
}

}  // namespace

std::string SweepManifest::to_text() const {
    std::ostringstream o;
    o << "# tessera sweep: what 'tessera resume' and 'tessera sweep --merge' read; do not edit\n";
    o << "format=1\n";
    o << "scenario=" << scenario << "\n";
    for (const std::string& s : sets) o << "set=" << s << "\n";
    for (const std::string& v : vary) o << "vary=" << v << "\n";
    o << "with=" << with_text() << "\n";
    o << "replicates=" << replicates << "\n";
    if (seed) o << "seed=" << *seed << "\n";
    o << "shard=" << shard_index << "/" << shard_count << "\n";
    o << "keep_series=" << (keep_series ? 1 : 0) << "\n";
    o << "eps=" << shortest_text(eps) << "\n";
    o << "final_window=" << shortest_text(final_window) << "\n";
    o << "points=" << points << "\n";
    char hex[20];
    std::snprintf(hex, sizeof hex, "%016llx", static_cast<unsigned long long>(checksum));
    o << "checksum=" << hex << "\n";
    return o.str();
}

bool SweepManifest::same_sweep(const SweepManifest& other) const {
    SweepManifest a = *this, b = other;
    a.shard_index = b.shard_index = 1;
    return a.to_text() == b.to_text();
}

SweepManifest read_manifest(const fs::path& file) {
    SweepManifest m;
    bool format = false;
    for (const auto& [key, value] : read_pairs(file)) {
        if (key == "format") {
            if (value != "1") throw std::runtime_error(file.string() + ": format " + value + " is not one this tessera reads");
            format = true;
        } else if (key == "scenario") {
            m.scenario = value;
        } else if (key == "set") {
            m.sets.push_back(value);
        } else if (key == "vary") {
            m.vary.push_back(value);
        } else if (key == "with") {
            if (value != "limit" && value != "run" && value != "both")
                throw std::runtime_error(file.string() + ": with: '" + value + "'; expected limit, run or both");
            m.with_limit = value != "run";
            m.with_run = value != "limit";
        } else if (key == "replicates") {
            m.replicates = static_cast<int>(to_u64(file, key, value));
        } else if (key == "seed") {
            m.seed = to_u64(file, key, value);
        } else if (key == "shard") {
            const std::size_t slash = value.find('/');
            if (slash == std::string::npos) throw std::runtime_error(file.string() + ": shard: expected I/N");
            m.shard_index = static_cast<int>(to_u64(file, key, value.substr(0, slash)));
            m.shard_count = static_cast<int>(to_u64(file, key, value.substr(slash + 1)));
        } else if (key == "keep_series") {
            m.keep_series = value == "1";
        } else if (key == "eps") {
            m.eps = std::strtod(value.c_str(), nullptr);
        } else if (key == "final_window") {
            m.final_window = std::strtod(value.c_str(), nullptr);
        } else if (key == "points") {
            m.points = to_u64(file, key, value);
        } else if (key == "checksum") {
            m.checksum = to_u64(file, key, value, 16);
        } else {
            throw std::runtime_error(file.string() + ": unknown key '" + key + "'");
        }
    }
    if (!format || m.scenario.empty() || m.vary.empty())
        throw std::runtime_error(file.string() + ": not a complete sweep manifest (format, scenario and vary are needed)");
    return m;
}

bool write_manifest(const fs::path& file, const SweepManifest& m) { return write_durably(file, m.to_text()); }

SweepState read_state(const fs::path& file) {
    SweepState s;
    for (const auto& [key, value] : read_pairs(file)) {
        const std::uint64_t v = to_u64(file, key, value);
        if (key == "points_done") s.points_done = v;
        else if (key == "outcomes_bytes") s.outcomes_bytes = v;
        else if (key == "final_exponents_bytes") s.final_exponents_bytes = v;
        else if (key == "summary_bytes") s.summary_bytes = v;
        else throw std::runtime_error(file.string() + ": unknown key '" + key + "'");
    }
    return s;
}

bool write_state(const fs::path& file, const SweepState& s, bool sync) {
    std::ostringstream o;
    o << "points_done=" << s.points_done << "\noutcomes_bytes=" << s.outcomes_bytes
      << "\nfinal_exponents_bytes=" << s.final_exponents_bytes << "\nsummary_bytes=" << s.summary_bytes << "\n";
    return write_durably(file, o.str(), sync);
}

}  // namespace tessera::cli
