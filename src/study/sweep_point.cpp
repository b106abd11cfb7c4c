#include "study/sweep_point.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>

#include "core/exponent_scale.hpp"
#include "core/number_text.hpp"

namespace tessera {

std::uint64_t point_seed(std::uint64_t base, std::size_t point) {
    std::uint64_t z = base + (static_cast<std::uint64_t>(point) + 1) * 0x9e3779b97f4a7c15ull;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
    return z ^ (z >> 31);
}

double habitable_patches(const Scenario& s) { return capacity_weighted_patches(s); }

std::vector<std::string> trait_names(const TraitGrid& traits) {
    std::vector<std::string> out;
    for (int i = 0; i < traits.size(); ++i) out.push_back(shortest_text(traits.dormancy(i)) + ":" + shortest_text(traits.transfer(i)));
    return out;
}

void ExponentRecorder::observe(const Engine& engine, unsigned kinds) {
    if (kinds & series_output) {
        const Lattice& lattice = engine.lattice();
        const int T = lattice.traits();
        // Totals in long double: a lattice may hold more than 2^63 cells, and the exponent
        // only needs the double the series writer would compute from the exact total.
        std::vector<long double> n(static_cast<std::size_t>(T), 0.0L);
        for (std::size_t p = 0; p < lattice.patches(); ++p) {
            const std::int64_t* a = lattice.active(p);
            const std::int64_t* d = lattice.dormant(p);
            for (int i = 0; i < T; ++i) n[static_cast<std::size_t>(i)] += static_cast<long double>(a[i] + d[i]);
        }
        const double log_K = std::log(engine.scenario().K);
        std::vector<double> e(static_cast<std::size_t>(T));
        for (int i = 0; i < T; ++i)
            e[static_cast<std::size_t>(i)] = std::log1p(static_cast<double>(n[static_cast<std::size_t>(i)]) / patches_) / log_K;
        series_.t_logK.push_back(engine.time_logK());
        series_.exponents.push_back(std::move(e));
    }
    if (next_) next_->observe(engine, kinds);
}

std::optional<PointResult> run_replicate(const Scenario& scenario, int replicate, const RegimeSettings& regimes,
                                         const std::atomic<bool>* stop, Observer* extra) {
    Engine engine(scenario, static_cast<std::uint32_t>(replicate));
    ExponentRecorder recorder(habitable_patches(scenario), extra);
    engine.run(recorder, stop);
    if (engine.time() < engine.until()) return std::nullopt;  // stopped early
    PointResult r;
    r.outcome = classify_series(recorder.series(), regimes);
    if (!recorder.series().exponents.empty()) r.final_exponents = recorder.series().exponents.back();
    return r;
}

PointResult limit_point(const Scenario& scenario, const RegimeSettings& regimes, const LimitSettings& limit) {
    const LimitPrediction prediction = predict_limit(scenario, limit);
    PointResult r;
    r.outcome = classify_limit(prediction, regimes);
    if (!prediction.knot_exponents.empty()) r.final_exponents = prediction.knot_exponents.back();
    return r;
}

std::vector<SummaryRow> summarize_outcomes(const std::vector<Outcome>& outcomes, const std::vector<std::string>& names) {
    std::vector<SummaryRow> rows;
    const long n = static_cast<long>(outcomes.size());
    auto add = [&](const char* kind, const std::string& name, long k) {
        SummaryRow row;
        row.kind = kind;
        row.name = name;
        row.count = k;
        row.replicates = n;
        row.fraction = n > 0 ? static_cast<double>(k) / static_cast<double>(n) : 0.0;
        if (n > 0) row.interval = wilson_interval(k, n);
        rows.push_back(row);
    };
    for (Regime regime : all_regimes) {
        const long k = std::count_if(outcomes.begin(), outcomes.end(), [&](const Outcome& o) { return o.regime == regime; });
        add("regime", name_of(regime), k);
    }
    for (int i = 0; i < static_cast<int>(names.size()); ++i) {
        const long k = std::count_if(outcomes.begin(), outcomes.end(), [&](const Outcome& o) {
            return std::find(o.residents.begin(), o.residents.end(), i) != o.residents.end();
        });
        add("resident", names[static_cast<std::size_t>(i)], k);
    }
    return rows;
}

}  // namespace tessera
