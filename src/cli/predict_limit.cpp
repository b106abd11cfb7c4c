// tessera predict --model limit: the K -> infinity exponent limit (theory/exponent_limit.hpp)
// written as limit_series.csv and limit_phases.csv, with a short summary a newcomer can read:
// the resident sets in order, a cycle, coexistence, extinction, and where the theory stopped.
#include <cstdio>
#include <iostream>
#include <sstream>

#include "cli/output_directory.hpp"
#include "cli/predict_models.hpp"
#include "core/trait_grid.hpp"
#include "io/limit_writer.hpp"
#include "theory/exponent_limit.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::string num(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

std::string trait_text(const TraitGrid& g, int i) { return "(" + num(g.dormancy(i)) + ", " + num(g.transfer(i)) + ")"; }

std::string set_text(const TraitGrid& g, const LimitPhase& p) {
    if (p.residents.empty()) return p.end == PhaseEnd::no_equilibrium ? "(not settled)" : "no resident";
    std::string t;
    for (std::size_t k = 0; k < p.residents.size(); ++k) t += (k ? " + " : "") + trait_text(g, p.residents[k].trait);
    return t;
}

std::string end_text(const TraitGrid& g, const LimitPhase& p) {
    switch (p.end) {
        case PhaseEnd::invasion: {
            std::string t;
            for (std::size_t k = 0; k < p.invaders.size(); ++k) t += (k ? " + " : "") + trait_text(g, p.invaders[k]);
            return t + " reaches 1";
        }
        case PhaseEnd::until: return "run.until";
        case PhaseEnd::schedule: return "conditions change (schedule)";
        case PhaseEnd::no_resident: return "run.until; none can grow";
        case PhaseEnd::no_equilibrium: return "stopped: no equilibrium";
        case PhaseEnd::tie: return "stopped: tie";
    }
    return "";
}

bool write_files(const LimitPrediction& p, const Scenario& scenario, const fs::path& dir, bool phases) {
    const TraitGrid grid(scenario.dormancy_axis, scenario.transfer_axis);
    const fs::path series = dir / "limit_series.csv";
    if (!write_text(series, limit_series_header() +
                                limit_series_rows(p, grid, output_every_logK(scenario), until_logK(scenario)))) {
        std::cerr << "error: cannot write " << series.string() << "\n";
        return false;
    }
    if (!phases) return true;
    const fs::path table = dir / "limit_phases.csv";
    if (!write_text(table, limit_phases_header() + limit_phases_rows(p, grid))) {
        std::cerr << "error: cannot write " << table.string() << "\n";
        return false;
    }
    return true;
}

std::string summary(const LimitPrediction& p, const Scenario& scenario) {
    const TraitGrid g(scenario.dormancy_axis, scenario.transfer_axis);
    std::ostringstream o;
    o << "exponent limit (K -> infinity), t/lnK 0 to " << num(until_logK(scenario)) << ": resident sets\n";
    const std::size_t n = p.phases.size();
    const std::size_t shown = n <= 12 ? n : 10;
    for (std::size_t k = 0; k < n; ++k) {
        if (k == shown && k + 1 < n) {
            o << "  ... " << (n - shown - 1) << " more phases (all in limit_phases.csv)\n";
            k = n - 1;
        }
        const LimitPhase& ph = p.phases[k];
        char line[64];
        std::snprintf(line, sizeof line, "  t/lnK %8s to %8s  ", num(ph.start_t_logK).c_str(), num(ph.end_t_logK).c_str());
        o << line << set_text(g, ph) << "   [" << end_text(g, ph) << "]\n";
    }
    if (const auto c = find_cycle(p)) {
        o << "cycles with period " << num(c->period) << ": ";
        for (std::size_t k = 0; k < c->length; ++k) o << (k ? " -> " : "") << set_text(g, p.phases[c->first_phase + k]);
        o << " -> ..., from t/lnK " << num(p.phases[c->first_phase].start_t_logK) << ", repeated " << c->repeats
          << (c->repeats == 1 ? " time\n" : " times\n");
    }
    for (const LimitPhase& ph : p.phases) {
        if (ph.residents.size() < 2) continue;
        o << "coexistence: " << set_text(g, ph) << " resident together from t/lnK " << num(ph.start_t_logK) << "\n";
        break;
    }
    if (!p.phases.empty() && p.phases.back().end == PhaseEnd::no_resident)
        o << "extinction: no trait at exponent 1 from t/lnK " << num(p.phases.back().start_t_logK)
          << " on, and none can grow\n";
    if (!p.stop_reason.empty()) o << "stopped at t/lnK " << num(p.stopped_at) << ": " << p.stop_reason << "\n";
    return o.str();
}

}  // namespace

int predict_limit_into(const Scenario& scenario, const fs::path& dir, bool quiet) {
    const LimitPrediction p = predict_limit(scenario);
    if (!write_files(p, scenario, dir, true)) return 2;
    if (!quiet) {
        std::cout << summary(p, scenario) << "wrote " << (dir / "limit_series.csv").string() << " and "
                  << (dir / "limit_phases.csv").string() << "\n";
    }
    return 0;
}

bool write_limit_beside_run(const Scenario& scenario, const fs::path& dir) {
    if (limit_not_applicable(scenario)) return true;  // silent: nothing to put beside the run
    try {
        return write_files(predict_limit(scenario), scenario, dir, false);
    } catch (const std::exception& e) {
        std::cerr << "warning: the exponent limit beside the run failed (" << e.what() << "); the run goes on\n";
        return true;
    }
}

}  // namespace tessera::cli
