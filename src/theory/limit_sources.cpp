#include "theory/limit_sources.hpp"

#include <algorithm>
#include <cmath>
#include <set>

namespace tessera {

std::vector<std::vector<FloorSource>> floor_sources(const LimitModel& model, const FitnessClasses& classes,
                                                    const std::vector<char>& resident) {
    const TraitGrid& g = model.grid();
    const RateTable& r = model.rates();
    const int T = g.size();
    std::vector<std::set<FloorSource>> found(classes.members.size());
    auto cls = [&](int compartment) { return classes.class_of[static_cast<std::size_t>(compartment)]; };
    bool any_resident = false;
    for (char c : resident) any_resident = any_resident || c;

    for (const auto& e : classes.edges) found[static_cast<std::size_t>(e.to)].insert({e.from, -1, 0.0});

    const double alpha = model.scenario().rates.mutation_exponent;
    if (std::isfinite(alpha)) {
        for (int j = 0; j < T; ++j) {
            if (!(r.birth[static_cast<std::size_t>(j)] > 0)) continue;  // never divides: no mutants
            const bool parent_resident = resident[static_cast<std::size_t>(j)];
            const FloorSource from = parent_resident ? FloorSource{-1, -1, 1.0 - alpha} : FloorSource{cls(j), -1, -alpha};
            auto add = [&](const MutationTargets& targets) {
                for (int k = 0; k < targets.count; ++k) {
                    const int t = targets.trait[static_cast<std::size_t>(k)];
                    if (resident[static_cast<std::size_t>(t)] || cls(t) == from.class1) continue;
                    found[static_cast<std::size_t>(cls(t))].insert(from);
                }
            };
            if (r.mutation_backward < 1.0) add(r.forward[static_cast<std::size_t>(j)]);
            if (r.mutation_backward > 0.0) add(r.backward[static_cast<std::size_t>(j)]);
        }
    }

    // Transfer products of two partners below 1. With the frequency form and no resident the
    // limit leaves transfer out (docs/model.md: an assumption, the partners' proportions are
    // not given by their exponents).
    const bool products = r.transfer > 0 && r.transfer_copies == TransferCopies::transfer_only &&
                          (r.transfer_form == TransferForm::density || any_resident);
    if (products) {
        for (int j = 0; j < T; ++j) {
            if (resident[static_cast<std::size_t>(j)]) continue;
            for (int k = 0; k < T; ++k) {
                if (resident[static_cast<std::size_t>(k)] || g.y_level(k) <= g.y_level(j)) continue;
                const int p = g.index(g.x_level(j), g.y_level(k));
                if (p == k || resident[static_cast<std::size_t>(p)]) continue;
                const int cp = cls(p);
                if (cp == cls(j) || cp == cls(k)) continue;  // below the class's own exponent
                found[static_cast<std::size_t>(cp)].insert({std::min(cls(j), cls(k)), std::max(cls(j), cls(k)), -1.0});
            }
        }
    }

    std::vector<std::vector<FloorSource>> out(found.size());
    for (std::size_t u = 0; u < found.size(); ++u) out[u].assign(found[u].begin(), found[u].end());
    return out;
}

}  // namespace tessera
