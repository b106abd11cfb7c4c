#include "study/regime.hpp"

#include <algorithm>
#include <cmath>
#include <set>

namespace tessera {

const char* name_of(Regime regime) {
    switch (regime) {
        case Regime::extinct: return "extinct";
        case Regime::resident: return "resident";
        case Regime::coexistence: return "coexistence";
        case Regime::cycling: return "cycling";
    }
    return "?";
}

namespace {

using TraitSet = std::vector<int>;  // sorted trait indices

double top_of(const std::vector<double>& exponents) {
    double top = 0.0;
    for (double e : exponents) top = std::max(top, e);
    return top;
}

bool all_zero(const std::vector<double>& exponents) {
    return std::all_of(exponents.begin(), exponents.end(), [](double e) { return !(e > 0.0); });
}

// The leading set at one time, given the set before it (hysteresis).
TraitSet leading(const std::vector<double>& exponents, const TraitSet& before, const RegimeSettings& s) {
    TraitSet out;
    const double top = top_of(exponents);
    if (!(top > 0.0)) return out;  // nothing alive
    const double reference = std::min(1.0, top);
    for (int i = 0; i < static_cast<int>(exponents.size()); ++i) {
        const double e = exponents[static_cast<std::size_t>(i)];
        const bool was = std::binary_search(before.begin(), before.end(), i);
        const double threshold = reference - s.eps - (was ? s.hysteresis : 0.0);
        if (e > 0.0 && e >= threshold) out.push_back(i);
    }
    return out;
}

Outcome from_set(const TraitSet& set, double final_t) {
    Outcome o;
    o.final_t_logK = final_t;
    o.residents = set;
    o.regime = set.empty() ? Regime::extinct : set.size() == 1 ? Regime::resident : Regime::coexistence;
    return o;
}

}  // namespace

Outcome classify_series(const ExponentSeries& series, const RegimeSettings& s) {
    const std::size_t n = series.t_logK.size();
    if (n == 0) return from_set({}, 0.0);
    const double t_end = series.t_logK.back();
    if (all_zero(series.exponents.back())) return from_set({}, t_end);
    const double window_start = t_end - s.final_window * (t_end - series.t_logK.front());

    // Segments of constant leading set inside the final window; the hysteresis state is
    // carried from the first output time, so the set entering the window is well defined.
    struct Segment {
        TraitSet set;
        double start;
    };
    std::vector<Segment> segments;
    TraitSet current;
    for (std::size_t k = 0; k < n; ++k) {
        current = leading(series.exponents[k], current, s);
        if (series.t_logK[k] < window_start) continue;
        if (segments.empty() || segments.back().set != current) segments.push_back({current, series.t_logK[k]});
    }

    // Returns: a segment whose set was seen earlier in the window (not just before it).
    int returns = 0;
    double interval_sum = 0.0;
    for (std::size_t j = 0; j < segments.size(); ++j) {
        for (std::size_t i = j; i-- > 0;) {
            if (segments[i].set == segments[j].set) {
                ++returns;
                interval_sum += segments[j].start - segments[i].start;
                break;
            }
        }
    }
    if (returns >= s.min_returns) {
        Outcome o;
        o.regime = Regime::cycling;
        o.final_t_logK = t_end;
        std::set<int> all;
        for (const Segment& g : segments) all.insert(g.set.begin(), g.set.end());
        o.residents.assign(all.begin(), all.end());
        o.period = interval_sum / returns;
        return o;
    }
    // Not cycling: the leading set at the end (a run still in transition is classified by
    // where it got to; docs/model.md says how to make sure it settled).
    return from_set(segments.back().set, t_end);
}

Outcome classify_limit(const LimitPrediction& p, const RegimeSettings& s) {
    const double t_end = p.stopped_at;
    if (const auto cycle = find_cycle(p, s.limit_min_repeats)) {
        std::set<TraitSet> distinct;
        std::set<int> all;
        for (std::size_t k = cycle->first_phase; k < cycle->first_phase + cycle->length && k < p.phases.size(); ++k) {
            TraitSet set;
            for (const ResidentState& r : p.phases[k].residents) set.push_back(r.trait);
            std::sort(set.begin(), set.end());
            all.insert(set.begin(), set.end());
            distinct.insert(set);
        }
        if (distinct.size() >= 2) {
            Outcome o;
            o.regime = Regime::cycling;
            o.final_t_logK = t_end;
            o.residents.assign(all.begin(), all.end());
            o.period = cycle->period;
            return o;
        }
    }
    TraitSet last;
    if (!p.phases.empty()) {
        for (const ResidentState& r : p.phases.back().residents) last.push_back(r.trait);
        std::sort(last.begin(), last.end());
    }
    if (!last.empty()) return from_set(last, t_end);
    if (p.knot_exponents.empty() || all_zero(p.knot_exponents.back())) return from_set({}, t_end);
    return from_set(leading(p.knot_exponents.back(), {}, s), t_end);
}

std::string residents_text(const std::vector<int>& residents, const std::vector<std::string>& trait_names) {
    std::string out;
    for (int i : residents) {
        if (!out.empty()) out += ';';
        out += trait_names[static_cast<std::size_t>(i)];
    }
    return out;
}

}  // namespace tessera
