#include "core/rate_table.hpp"

#include <cmath>

namespace tessera {

namespace {

MutationTargets targets(const TraitGrid& g, int trait, int step) {
    MutationTargets t;
    int xl = g.x_level(trait) + step;
    int yl = g.y_level(trait) + step;
    if (xl >= 0 && xl < g.x_levels()) t.trait[t.count++] = g.index(xl, g.y_level(trait));
    if (yl >= 0 && yl < g.y_levels()) t.trait[t.count++] = g.index(g.x_level(trait), yl);
    return t;
}

}  // namespace

RateTable::RateTable(const TraitGrid& grid, const Rates& r, double K)
    : mutation_probability(std::isinf(r.mutation_exponent) ? 0.0 : std::pow(K, -r.mutation_exponent)),
      mutation_backward(r.mutation_backward),
      transfer(r.transfer),
      transfer_form(r.transfer_form),
      transfer_copies(r.transfer_copies),
      dormant_death(r.dormant_death),
      resuscitation(r.resuscitation),
      competition_counts_dormant(r.competition_counts_dormant) {
    const int n = grid.size();
    birth.resize(n);
    death.assign(n, r.death);
    competition.assign(n, r.competition);
    dormancy_probability.resize(n);
    forward.resize(n);
    backward.resize(n);
    for (int i = 0; i < n; ++i) {
        birth[i] = r.birth_max - r.birth_cost_dormancy * grid.dormancy(i) -
                   r.birth_cost_transfer * grid.transfer(i);
        dormancy_probability[i] = r.dormancy_probability * grid.dormancy(i);
        forward[i] = targets(grid, i, +1);
        backward[i] = targets(grid, i, -1);
    }
    for (const RateOverride& o : r.overrides) {
        auto i = grid.find(o.dormancy, o.transfer);
        if (!i) continue;  // the loader has already rejected traits off the grid
        if (o.birth) birth[*i] = *o.birth;
        if (o.death) death[*i] = *o.death;
        if (o.competition) competition[*i] = *o.competition;
        if (o.dormancy_probability) dormancy_probability[*i] = *o.dormancy_probability;
    }
}

}  // namespace tessera
