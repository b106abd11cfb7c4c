#include "core/deterministic_ode.hpp"

#include <algorithm>

namespace tessera {

DeterministicOde::DeterministicOde(const Scenario& scenario, const TraitGrid& grid, const RateTable& rates,
                                   std::vector<PatchConditions> where)
    : grid_(grid),
      rates_(rates),
      where_(std::move(where)),
      neighbourhood_(scenario.width, scenario.height, scenario.neighbourhood, scenario.boundary),
      width_(scenario.width),
      T_(grid.size()),
      boundary_(scenario.boundary),
      migration_(scenario.rates.migration),
      migration_dormant_(scenario.rates.migration_dormant),
      level_(grid.y_levels()) {}

// One patch's local terms of model.md section 5:
//   da_i = (b_i - d_i - s) a_i - C_i (n / c) a_i + r sigma z_i + T_i(a)
//   dz_i = q_i C_i (n / c) a_i - (kappa + r sigma) z_i
// with n the active density (plus the dormant one when competition counts dormant cells).
void DeterministicOde::local(const double* a, const double* z, const PatchConditions& c, double* da,
                             double* dz) const {
    const int ny = grid_.y_levels();
    double n = 0, zn = 0;
    std::fill(level_.begin(), level_.end(), 0.0);
    for (int i = 0; i < T_; ++i) {
        n += a[i];
        zn += z[i];
        level_[grid_.y_level(i)] += a[i];
    }
    const double crowd = (rates_.competition_counts_dormant ? n + zn : n) / c.capacity;
    const double resus = rates_.resuscitation * c.resuscitation;
    for (int i = 0; i < T_; ++i) {
        const double encounters = rates_.competition[i] * crowd * a[i];
        da[i] += (rates_.birth[i] - rates_.death[i] - c.stress) * a[i] - encounters + resus * z[i];
        dz[i] += rates_.dormancy_probability[i] * encounters - (rates_.dormant_death + resus) * z[i];
    }
    if (!(rates_.transfer > 0) || ny < 2 || !(n > 0)) return;
    // Conjugation: recipient j meets donors at every level above y_j at rate
    // tau/n a_j L_l (frequency) or tau/c a_j L_l (density). Whole copy: the gain goes to the
    // donor's trait, shared over level l's column in proportion to a_i; transfer_only: to
    // (x_j, l).
    const double factor = rates_.transfer / (rates_.transfer_form == TransferForm::frequency ? n : c.capacity);
    std::vector<double> won(static_cast<std::size_t>(ny), 0.0);  // whole copy: gains per level
    for (int j = 0; j < T_; ++j) {
        if (!(a[j] > 0)) continue;
        for (int l = grid_.y_level(j) + 1; l < ny; ++l) {
            const double flow = factor * a[j] * level_[l];
            da[j] -= flow;
            if (rates_.transfer_copies == TransferCopies::whole) {
                won[l] += flow;
            } else {
                da[grid_.index(grid_.x_level(j), l)] += flow;
            }
        }
    }
    for (int l = 0; l < ny; ++l) {
        if (!(won[l] > 0)) continue;
        for (int xl = 0; xl < grid_.x_levels(); ++xl) {
            const int i = grid_.index(xl, l);
            da[i] += won[l] * a[i] / level_[l];
        }
    }
}

void DeterministicOde::operator()(const std::vector<double>& y, std::vector<double>& dydt, double) const {
    std::fill(dydt.begin(), dydt.end(), 0.0);
    const std::size_t P = where_.size();
    const int dirs = neighbourhood_.size();
    for (std::size_t p = 0; p < P; ++p) {
        const PatchConditions& c = where_[p];
        if (!(c.capacity > 0)) continue;  // a wall holds nothing
        const double* a = y.data() + active_index(p, 0);
        const double* z = y.data() + dormant_index(p, 0);
        double* da = dydt.data() + active_index(p, 0);
        double* dz = dydt.data() + dormant_index(p, 0);
        local(a, z, c, da, dz);
        // Migration: m * permeability * a_i / |neighbourhood| towards each neighbour; a flow
        // towards a wall or off a reflecting edge stays home, off an absorbing edge is lost.
        const int col = static_cast<int>(p % static_cast<std::size_t>(width_));
        const int row = static_cast<int>(p / static_cast<std::size_t>(width_));
        const double rate[2] = {migration_ * c.permeability / dirs, migration_dormant_ * c.permeability / dirs};
        for (int dir = 0; dir < dirs; ++dir) {
            const auto to = neighbourhood_.step(col, row, dir);
            if (to.kind == Neighbourhood::Target::off_edge && boundary_ != Boundary::absorbing) continue;
            if (to.kind == Neighbourhood::Target::patch &&
                !(where_[static_cast<std::size_t>(to.patch)].capacity > 0)) {
                continue;
            }
            for (int comp = 0; comp < 2; ++comp) {
                if (!(rate[comp] > 0)) continue;
                const std::size_t from = p * 2 * T_ + static_cast<std::size_t>(comp) * T_;
                for (int i = 0; i < T_; ++i) {
                    const double flow = rate[comp] * y[from + i];
                    dydt[from + i] -= flow;
                    if (to.kind == Neighbourhood::Target::patch) {
                        dydt[static_cast<std::size_t>(to.patch) * 2 * T_ + static_cast<std::size_t>(comp) * T_ + i] +=
                            flow;
                    }
                }
            }
        }
    }
}

}  // namespace tessera
