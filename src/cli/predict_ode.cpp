// tessera predict --model ode: the deterministic model in counts (src/theory/count_model.hpp)
// at the scenario's own K, written in the formats of a run's files so the viewer, `tessera
// render --fields ode_fields.h5` and figures read it like a run: ode_series.csv,
// ode_habitat_series.csv and (when output.fields_every > 0) ode_fields.h5.
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>
#include <numeric>
#include <stdexcept>
#include <string>
#include <vector>

#include "cli/csv_output.hpp"
#include "cli/predict_models.hpp"
#include "io/fields_writer.hpp"
#include "io/series_writer.hpp"
#include "theory/count_model.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

// Traits listed in the summary: the leading ones by final count.
constexpr int summary_traits = 5;

std::string number(double v, const char* format = "%.4g") {
    char buf[48];
    std::snprintf(buf, sizeof buf, format, v);
    return buf;
}

// The final lattice totals, largest first (traits with at least one cell; at least one line).
void print_summary(const Scenario& s, const TraitGrid& traits, const CountState& last, const fs::path& dir,
                   bool fields, std::uint64_t rows, std::uint64_t snapshots, double seconds) {
    const int T = traits.size();
    std::vector<double> active(static_cast<std::size_t>(T), 0.0), dormant(active.size(), 0.0);
    const std::size_t P = last.active.size() / static_cast<std::size_t>(T);
    for (std::size_t p = 0; p < P; ++p) {
        for (int i = 0; i < T; ++i) {
            active[i] += last.active[p * T + i];
            dormant[i] += last.dormant[p * T + i];
        }
    }
    std::vector<int> order(static_cast<std::size_t>(T));
    std::iota(order.begin(), order.end(), 0);
    std::stable_sort(order.begin(), order.end(),
                     [&](int a, int b) { return active[a] + dormant[a] > active[b] + dormant[b]; });
    const double log_K = std::log(s.K), habitable = habitable_patches(s, -1);
    std::cout << "deterministic model in counts, K = " << number(s.K) << ", " << s.width << " x " << s.height
              << " lattice, " << T << " traits, "
              << (std::isinf(s.rates.mutation_exponent) ? std::string("no mutation")
                                                        : "mutation as a source (mu = K^-" + number(s.rates.mutation_exponent) + ")")
              << ": " << rows << " output times, " << snapshots << " field snapshots, " << number(seconds, "%.2f")
              << " s\n";
    std::cout << "at t = " << number(last.t) << " (t / ln K = " << number(last.t_logK)
              << "), lattice totals, leading traits:\n";
    int shown = 0;
    for (int i : order) {
        const double n = active[i] + dormant[i];
        if (shown >= summary_traits || (shown > 0 && n < 1.0)) break;
        std::cout << "  (" << number(traits.dormancy(i)) << ", " << number(traits.transfer(i)) << ")  active "
                  << number(active[i]) << "  dormant " << number(dormant[i]) << "  exponent "
                  << number(std::log1p(n) / log_K, "%.3f") << "  exponent_per_patch "
                  << number(habitable > 0 ? std::log1p(n / habitable) / log_K : 0.0, "%.3f") << "\n";
        ++shown;
    }
    std::cout << "written: " << (dir / "ode_series.csv").string() << ", " << (dir / "ode_habitat_series.csv").string();
    if (fields) std::cout << ", " << (dir / "ode_fields.h5").string();
    std::cout << "\n";
    if (fields) {
        std::cout << "frames: tessera render " << dir.string() << " --fields ode_fields.h5 --out "
                  << (dir / "ode_frames").string() << "\n";
    }
}

}  // namespace

int predict_ode_into(const Scenario& scenario, const fs::path& dir, bool quiet) {
    Scenario s = scenario;  // completed as a run completes it
    if (s.habitats.empty()) s.habitats.push_back(Habitat{});
    if (s.habitat_of_patch.size() != static_cast<std::size_t>(s.width) * s.height) {
        s.habitat_of_patch.assign(static_cast<std::size_t>(s.width) * s.height, 0);
    }
    const auto began = std::chrono::steady_clock::now();
    try {
        const CountModel model(s);
        CsvOutput series(dir / "ode_series.csv", series_header(), 1);
        CsvOutput habitat_series(dir / "ode_habitat_series.csv", habitat_series_header(), 1);
        if (!series.open() || !habitat_series.open()) return 2;
        std::unique_ptr<FieldsWriter> fields;
        if (s.fields_every > 0) {
            fields = std::make_unique<FieldsWriter>((dir / "ode_fields.h5").string(), s, model.traits(), 0,
                                                    FieldCounts::real);
        }
        std::string buffer;
        std::uint64_t rows = 0;
        CountState last;
        model.run([&](const CountState& now) {
            if (now.kinds & series_output) {
                const RealCounts counts{s, model.traits(), 0, now.t, now.t_logK, now.active, now.dormant};
                buffer.clear();
                append_series_rows(counts, buffer);
                series.write(0, buffer);
                buffer.clear();
                append_habitat_series_rows(counts, buffer);
                habitat_series.write(0, buffer);
                ++rows;
            }
            if ((now.kinds & fields_output) && fields) fields->append(now.t, now.t_logK, now.active, now.dormant);
            last = now;
        });
        if (!series.finish() || !habitat_series.finish()) return 2;
        const std::uint64_t snapshots = fields ? fields->snapshots() : 0;
        fields.reset();
        const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - began).count();
        if (!quiet) print_summary(s, model.traits(), last, dir, snapshots > 0, rows, snapshots, seconds);
    } catch (const std::runtime_error& e) {
        std::cerr << "error: tessera predict --model ode: " << e.what() << "\n";
        return 1;
    }
    return 0;
}

}  // namespace tessera::cli
