#include "cli/sweep_report.hpp"

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

namespace tessera::cli {

namespace {

// Beyond this many points a table on the terminal is no longer read; summary.csv is.
constexpr std::size_t max_table_points = 60;

struct Line {
    std::size_t point = 0;
    std::string source;
    long replicates = 0;
    std::map<std::string, double> regimes;
    std::string residents;  // traits resident in at least half the replicates
};

std::vector<std::string> fields(const std::string& row) {
    std::vector<std::string> f;
    std::stringstream in(row);
    std::string x;
    while (std::getline(in, x, ',')) f.push_back(x);
    return f;
}

}  // namespace

void print_sweep_report(const std::filesystem::path& dir, const ParameterGrid& grid, std::ostream& out) {
    std::ifstream in(dir / "summary.csv");
    std::vector<Line> lines;
    std::string row;
    std::getline(in, row);  // header
    while (std::getline(in, row)) {
        const std::vector<std::string> f = fields(row);
        if (f.size() < 8) continue;
        const std::size_t point = std::strtoull(f[0].c_str(), nullptr, 10);
        if (lines.empty() || lines.back().point != point || lines.back().source != f[1]) {
            lines.push_back({point, f[1], std::strtol(f[2].c_str(), nullptr, 10), {}, ""});
        }
        const double fraction = std::strtod(f[5].c_str(), nullptr);
        if (f[3] == "regime") lines.back().regimes[f[4]] = fraction;
        if (f[3] == "resident" && fraction >= 0.5)
            lines.back().residents += (lines.back().residents.empty() ? "" : " ") + f[4];
    }
    std::size_t points = 0;
    for (std::size_t k = 0; k < lines.size(); ++k) points += k == 0 || lines[k].point != lines[k - 1].point;
    out << "sweep of " << points << " points written to " << dir.string()
        << "/ (points.csv, outcomes.csv, final_exponents.csv, summary.csv)\n";
    if (points > max_table_points) {
        out << "the table per point is in summary.csv\n";
        return;
    }
    std::vector<std::size_t> widths;
    for (const GridAxis& a : grid.axes()) widths.push_back(a.key.size());
    for (const Line& l : lines) {
        const std::vector<std::string> v = grid.values(l.point);
        for (std::size_t a = 0; a < v.size(); ++a) widths[a] = std::max(widths[a], v[a].size());
    }
    char buf[256];
    std::string head = "point";
    for (std::size_t a = 0; a < widths.size(); ++a) {
        std::snprintf(buf, sizeof buf, "  %-*s", static_cast<int>(widths[a]), grid.axes()[a].key.c_str());
        head += buf;
    }
    out << head << "  source  runs  extinct  resident  coexist  cycling  resident in >= half\n";
    for (const Line& l : lines) {
        std::snprintf(buf, sizeof buf, "%5zu", l.point);
        std::string text = buf;
        const std::vector<std::string> v = grid.values(l.point);
        for (std::size_t a = 0; a < v.size(); ++a) {
            std::snprintf(buf, sizeof buf, "  %-*s", static_cast<int>(widths[a]), v[a].c_str());
            text += buf;
        }
        auto at = [&](const char* r) {
            const auto it = l.regimes.find(r);
            return it == l.regimes.end() ? 0.0 : it->second;
        };
        std::snprintf(buf, sizeof buf, "  %-6s  %4ld  %7.2f  %8.2f  %7.2f  %7.2f  %s", l.source.c_str(), l.replicates,
                      at("extinct"), at("resident"), at("coexistence"), at("cycling"),
                      l.residents.empty() ? "-" : l.residents.c_str());
        out << text << buf << "\n";
    }
}

}  // namespace tessera::cli
