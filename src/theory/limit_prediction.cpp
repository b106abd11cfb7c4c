// The results of the exponent limit: names of phase ends, times in t / ln K, the exponents
// between knots, and cycles of resident sets.
#include <algorithm>
#include <cmath>

#include "theory/exponent_limit.hpp"

namespace tessera {

const char* name_of(PhaseEnd end) {
    switch (end) {
        case PhaseEnd::invasion: return "invasion";
        case PhaseEnd::until: return "until";
        case PhaseEnd::no_equilibrium: return "no_equilibrium";
        case PhaseEnd::no_resident: return "no_resident";
        case PhaseEnd::tie: return "tie";
        case PhaseEnd::schedule: return "schedule";
    }
    return "?";
}

double until_logK(const Scenario& s) { return s.time_unit == TimeUnit::logK ? s.until : s.until / std::log(s.K); }
double output_every_logK(const Scenario& s) {
    return s.time_unit == TimeUnit::logK ? s.output_every : s.output_every / std::log(s.K);
}

double LimitPrediction::exponent_at(int trait, double s) const {
    if (knot_t_logK.empty() || s > stopped_at || s < 0 || std::isnan(s)) return std::nan("");
    const auto after = std::upper_bound(knot_t_logK.begin(), knot_t_logK.end(), s);
    const std::size_t k = static_cast<std::size_t>(after - knot_t_logK.begin()) - 1;  // last knot at or before s
    const double b0 = knot_exponents[k][static_cast<std::size_t>(trait)];
    if (k + 1 >= knot_t_logK.size()) return b0;
    const double t0 = knot_t_logK[k], t1 = knot_t_logK[k + 1];
    const double b1 = knot_exponents[k + 1][static_cast<std::size_t>(trait)];
    return t1 > t0 ? b0 + (b1 - b0) * (s - t0) / (t1 - t0) : b1;
}

std::optional<ResidentCycle> find_cycle(const LimitPrediction& p, int min_repeats, double tolerance) {
    auto complete = [&](std::size_t k) {
        return k < p.phases.size() && (p.phases[k].end == PhaseEnd::invasion || p.phases[k].end == PhaseEnd::schedule);
    };
    auto same = [&](std::size_t a, std::size_t b) {
        const LimitPhase &x = p.phases[a], &y = p.phases[b];
        if (x.residents.size() != y.residents.size()) return false;
        for (std::size_t k = 0; k < x.residents.size(); ++k)
            if (x.residents[k].trait != y.residents[k].trait) return false;
        const double dx = x.end_t_logK - x.start_t_logK, dy = y.end_t_logK - y.start_t_logK;
        return std::fabs(dx - dy) <= tolerance;
    };
    const std::size_t n = p.phases.size();
    for (std::size_t first = 0; first < n; ++first) {
        for (std::size_t length = 1; first + 2 * length <= n; ++length) {
            int repeats = 0;
            for (;; ++repeats) {
                const std::size_t at = first + static_cast<std::size_t>(repeats + 1) * length;
                bool ok = true;
                for (std::size_t k = 0; k < length && ok; ++k)
                    ok = complete(first + k) && complete(at + k) && same(first + k, at + k);
                if (!ok) break;
            }
            // A cycle changes residents: a sequence of one resident set (a schedule repeating
            // under the same residents) is not one.
            bool changes = false;
            for (std::size_t k = 1; k < length && !changes; ++k) {
                const auto &a = p.phases[first].residents, &b = p.phases[first + k].residents;
                changes = a.size() != b.size() ||
                          !std::equal(a.begin(), a.end(), b.begin(), [](const ResidentState& x, const ResidentState& y) {
                              return x.trait == y.trait;
                          });
            }
            if (changes && repeats >= std::max(1, min_repeats)) {
                ResidentCycle c{first, length, 0.0, repeats};
                for (std::size_t k = 0; k < length; ++k)
                    c.period += p.phases[first + k].end_t_logK - p.phases[first + k].start_t_logK;
                return c;
            }
        }
    }
    return std::nullopt;
}

}  // namespace tessera
