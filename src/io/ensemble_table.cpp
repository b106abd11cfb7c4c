#include "io/ensemble_table.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iterator>
#include <stdexcept>
#include <vector>

#include "study/ensemble_statistics.hpp"
#include "study/sweep_point.hpp"

namespace fs = std::filesystem;

#include "core/number_text.hpp"

namespace tessera {

namespace {

// One row of series.csv: the texts that are copied, the numbers that are summarised.
struct SeriesRow {
    std::string t, t_logK, dormancy, transfer;
    double exponent = 0.0;
    double count = 0.0;  // active + dormant
};

[[noreturn]] void malformed(std::size_t line, const std::string& what) {
    throw std::runtime_error("series.csv:" + std::to_string(line) + ": " + what);
}

}  // namespace

std::string ensemble_header() {
    return "t,t_logK,dormancy,transfer,replicates,present,"
           "exponent_mean,exponent_median,exponent_q10,exponent_q90,"
           "exponent_per_patch_mean,exponent_per_patch_median,exponent_per_patch_q10,exponent_per_patch_q90,"
           "count_mean,count_median,count_q10,count_q90\n";
}

std::string ensemble_csv(const std::string& text, const Scenario& scenario) {
    std::vector<std::vector<SeriesRow>> by_replicate;
    std::size_t line = 0, pos = 0;
    while (pos < text.size()) {
        std::size_t end = text.find('\n', pos);
        if (end == std::string::npos) end = text.size();
        const std::string row = text.substr(pos, end - pos);
        pos = end + 1;
        ++line;
        if (line == 1) continue;  // the header
        if (row.empty()) continue;
        std::vector<std::string> f;
        std::size_t s = 0;
        for (;;) {
            const std::size_t c = row.find(',', s);
            f.push_back(row.substr(s, c == std::string::npos ? std::string::npos : c - s));
            if (c == std::string::npos) break;
            s = c + 1;
        }
        if (f.size() < 8) malformed(line, "expected replicate,t,t_logK,dormancy,transfer,active,dormant,exponent");
        char* stop = nullptr;
        const unsigned long r = std::strtoul(f[0].c_str(), &stop, 10);
        if (stop == f[0].c_str() || *stop) malformed(line, "replicate '" + f[0] + "' is not a whole number");
        if (r >= by_replicate.size()) by_replicate.resize(r + 1);
        SeriesRow out{f[1], f[2], f[3], f[4], std::strtod(f[7].c_str(), nullptr), 0.0};
        // Counts may exceed 2^64 on a large lattice: read them as long double.
        out.count = static_cast<double>(std::strtold(f[5].c_str(), nullptr) + std::strtold(f[6].c_str(), nullptr));
        by_replicate[r].push_back(std::move(out));
    }
    const std::size_t R = by_replicate.size();
    if (R == 0) return ensemble_header();
    const std::size_t rows = by_replicate[0].size();
    for (std::size_t r = 1; r < R; ++r) {
        if (by_replicate[r].size() != rows)
            throw std::runtime_error("series.csv: replicate " + std::to_string(r) + " has " +
                                     std::to_string(by_replicate[r].size()) + " rows, replicate 0 has " +
                                     std::to_string(rows) + "; the run is not finished");
    }
    const double log_K = std::log(scenario.K);
    const double P = habitable_patches(scenario);
    std::string out = ensemble_header();
    std::vector<double> exponent(R), per_patch(R), count(R);
    for (std::size_t k = 0; k < rows; ++k) {
        std::size_t present = 0;
        for (std::size_t r = 0; r < R; ++r) {
            const SeriesRow& row = by_replicate[r][k];
            exponent[r] = row.exponent;
            count[r] = row.count;
            per_patch[r] = std::log1p(row.count / P) / log_K;
            if (row.count > 0) ++present;
        }
        const SeriesRow& first = by_replicate[0][k];
        out += first.t + "," + first.t_logK + "," + first.dormancy + "," + first.transfer + "," + std::to_string(R) + ",";
        append_number(out, static_cast<double>(present) / static_cast<double>(R));
        for (const std::vector<double>* v : {&exponent, &per_patch, &count}) {
            const EnsembleSummary s = summarize(*v);
            for (double x : {s.mean, s.median, s.q10, s.q90}) {
                out += ',';
                append_number(out, x);
            }
        }
        out += '\n';
    }
    return out;
}

void write_ensemble(const fs::path& series, const fs::path& ensemble, const Scenario& scenario) {
    std::ifstream in(series, std::ios::binary);
    if (!in) throw std::runtime_error(series.string() + ": cannot be read for ensemble.csv");
    const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
    const std::string table = ensemble_csv(text, scenario);
    const fs::path temporary = ensemble.string() + ".tmp";
    {
        std::ofstream out(temporary, std::ios::binary);
        out << table;
        out.close();
        if (!out) throw std::runtime_error(ensemble.string() + ": cannot be written");
    }
    fs::rename(temporary, ensemble);
}

}  // namespace tessera
