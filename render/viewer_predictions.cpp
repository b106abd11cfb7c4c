#include "render/viewer_predictions.hpp"

#include <exception>
#include <iostream>

#include "core/exponent_scale.hpp"
#include "theory/count_model.hpp"

namespace tessera {

// The K -> infinity limit for the live plot's dashed lines, when it applies to the scenario
// (one patch, ...); nothing when it does not or cannot be computed (the window still runs).
std::optional<LimitPrediction> limit_for(const Scenario& scenario) {
    if (limit_not_applicable(scenario)) return std::nullopt;
    try {
        return predict_limit(scenario);
    } catch (const std::exception& e) {
        std::cerr << "note: the K -> infinity limit is not shown: " << e.what() << "\n";
        return std::nullopt;
    }
}

// The deterministic model in counts at this K, as the live plot's history (normalised
// exponents of the lattice totals), for `tessera view --predict ode`; computed once before
// the window opens. Empty when it fails (the window still runs; the reason is printed).
std::vector<TraitHistoryPoint> ode_for(const Scenario& scenario) {
    std::vector<TraitHistoryPoint> out;
    try {
        const CountModel model(scenario);
        const int T = model.traits().size();
        const double P = capacity_weighted_patches(scenario);
        model.run([&](const CountState& state) {
            TraitHistoryPoint point{state.t_logK, std::vector<double>(static_cast<std::size_t>(T), 0.0)};
            const std::size_t patches = state.active.size() / static_cast<std::size_t>(T);
            for (int i = 0; i < T; ++i) {
                double cells = 0.0;
                for (std::size_t p = 0; p < patches; ++p) {
                    cells += state.active[p * T + i] + state.dormant[p * T + i];
                }
                point.exponent[static_cast<std::size_t>(i)] = normalised_exponent(cells, P, scenario.K);
            }
            out.push_back(std::move(point));
        });
    } catch (const std::exception& e) {
        std::cerr << "note: the deterministic model is not shown: " << e.what() << "\n";
        out.clear();
    }
    return out;
}

}  // namespace tessera
