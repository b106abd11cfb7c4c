#include "core/deterministic_ode.hpp"

#include <algorithm>
#include <stdexcept>

#include "core/parallel.hpp"

namespace tessera {

DeterministicOde::DeterministicOde(const Scenario& scenario, const TraitGrid& grid, const RateTable& rates,
                                   std::vector<PatchConditions> where, MutationTerm mutation)
    : grid_(grid),
      rates_(rates),
      where_(std::move(where)),
      neighbourhood_(scenario.width, scenario.height, scenario.neighbourhood, scenario.boundary),
      width_(scenario.width),
      T_(grid.size()),
      boundary_(scenario.boundary),
      migration_(scenario.rates.migration),
      migration_dormant_(scenario.rates.migration_dormant),
      migrates_(where_.size() > 1 && (migration_ > 0 || migration_dormant_ > 0)),
      mutants_(static_cast<std::size_t>(T_)) {
    // The split of a division's offspring, as in the engines (core/leap_patch.cpp).
    const double mu = mutation == MutationTerm::source ? rates.mutation_probability : 0.0;
    const double back = rates.mutation_backward;
    for (int i = 0; mu > 0 && i < T_; ++i) {
        const MutationTargets* dirs[2] = {&rates.forward[i], &rates.backward[i]};
        const double share[2] = {mu * (1 - back), mu * back};
        for (int d = 0; d < 2; ++d) {
            if (dirs[d]->count == 0 || !(share[d] > 0)) continue;  // no target: no mutation happens
            for (int k = 0; k < dirs[d]->count; ++k) mutants_[i].push_back({dirs[d]->trait[k], share[d] / dirs[d]->count});
        }
    }
    // Who sends migrants to whom does not depend on the conditions (walls are checked when
    // the derivative is taken, since a schedule may change a capacity).
    const std::size_t P = where_.size();
    std::vector<std::vector<Inflow>> in(P);
    for (std::size_t q = 0; migrates_ && q < P; ++q) {
        const int col = static_cast<int>(q % static_cast<std::size_t>(width_));
        const int row = static_cast<int>(q / static_cast<std::size_t>(width_));
        for (int dir = 0; dir < neighbourhood_.size(); ++dir) {
            const auto to = neighbourhood_.step(col, row, dir);
            if (to.kind == Neighbourhood::Target::patch) {
                in[static_cast<std::size_t>(to.patch)].push_back({static_cast<std::uint32_t>(q), static_cast<std::uint8_t>(dir)});
            }
        }
    }
    inflow_start_.assign(P + 1, 0);
    for (std::size_t p = 0; p < P; ++p) {
        inflow_start_[p + 1] = inflow_start_[p] + in[p].size();
        inflow_.insert(inflow_.end(), in[p].begin(), in[p].end());
    }
    for (int i = 0; i < T_; ++i) {
        y_of_.push_back(grid.y_level(i));
        x_of_.push_back(grid.x_level(i));
    }
    refresh_migration();
}

void DeterministicOde::set_conditions(std::vector<PatchConditions> where) {
    if (where.size() != where_.size()) throw std::invalid_argument("DeterministicOde::set_conditions: wrong number of patches");
    where_ = std::move(where);
    refresh_migration();
}

// A jump from `from` in `dir` passes unless it goes towards a wall or off a reflecting or
// periodic-less edge (off an absorbing edge it passes and is lost).
void DeterministicOde::refresh_migration() {
    const std::size_t P = where_.size();
    out_rate_.assign(2 * P, 0.0);
    send_rate_.assign(2 * P, 0.0);
    if (!migrates_) return;
    const int dirs = neighbourhood_.size();
    for (std::size_t p = 0; p < P; ++p) {
        if (!(where_[p].capacity > 0)) continue;  // a wall holds and sends nothing
        const int col = static_cast<int>(p % static_cast<std::size_t>(width_));
        const int row = static_cast<int>(p / static_cast<std::size_t>(width_));
        int leaving = 0;
        for (int dir = 0; dir < dirs; ++dir) {
            const auto to = neighbourhood_.step(col, row, dir);
            const bool passes = to.kind == Neighbourhood::Target::off_edge
                                    ? boundary_ == Boundary::absorbing
                                    : where_[static_cast<std::size_t>(to.patch)].capacity > 0;
            leaving += passes ? 1 : 0;
        }
        for (int comp = 0; comp < 2; ++comp) {
            const double rate = (comp == 0 ? migration_ : migration_dormant_) * where_[p].permeability / dirs;
            send_rate_[2 * p + comp] = rate;
            out_rate_[2 * p + comp] = leaving * rate;
        }
    }
}

// One patch's local terms of model.md section 5:
//   da_i = (b_i - d_i - s) a_i - C_i (n / c) a_i + r sigma z_i + T_i(a) + mutation
//   dz_i = q_i C_i (n / c) a_i - (kappa + r sigma) z_i
// with n the active density (plus the dormant one when competition counts dormant cells).
void DeterministicOde::local(const double* a, const double* z, const PatchConditions& c, double* da, double* dz,
                             Work& w) const {
    const int ny = grid_.y_levels();
    double n = 0, zn = 0;
    w.level.assign(static_cast<std::size_t>(ny), 0.0);
    for (int i = 0; i < T_; ++i) {
        n += a[i];
        zn += z[i];
        w.level[y_of_[i]] += a[i];
    }
    const double crowd = (rates_.competition_counts_dormant ? n + zn : n) / c.capacity;
    const double resus = rates_.resuscitation * c.resuscitation;
    for (int i = 0; i < T_; ++i) {
        const double encounters = rates_.competition[i] * crowd * a[i];
        da[i] += (rates_.birth[i] - rates_.death[i] - c.stress) * a[i] - encounters + resus * z[i];
        dz[i] += rates_.dormancy_probability[i] * encounters - (rates_.dormant_death + resus) * z[i];
        // Mutant offspring leave the parent's trait for their target's.
        for (const Mutant& m : mutants_[static_cast<std::size_t>(i)]) {
            const double flow = m.share * rates_.birth[i] * a[i];
            da[i] -= flow;
            da[m.target] += flow;
        }
    }
    if (!(rates_.transfer > 0) || ny < 2 || !(n > 0)) return;
    // Conjugation: recipient j meets donors at every level above y_j at rate
    // tau/n a_j L_l (frequency) or tau/c a_j L_l (density). Whole copy: the gain goes to the
    // donor's trait, shared over level l's column in proportion to a_i; transfer_only: to
    // (x_j, l).
    const double factor = rates_.transfer / (rates_.transfer_form == TransferForm::frequency ? n : c.capacity);
    // A density the integrator has carried a little below 0 keeps its loss term, which pulls
    // it back: skipping it would leave such a recipient growing at b - d - C n, away from 0.
    w.won.assign(static_cast<std::size_t>(ny), 0.0);
    for (int j = 0; j < T_; ++j) {
        if (a[j] == 0) continue;
        for (int l = y_of_[j] + 1; l < ny; ++l) {
            const double flow = factor * a[j] * w.level[l];
            da[j] -= flow;
            if (rates_.transfer_copies == TransferCopies::whole) {
                w.won[l] += flow;
            } else {
                da[x_of_[j] * ny + l] += flow;
            }
        }
    }
    for (int l = 0; l < ny; ++l) {
        if (w.won[l] == 0 || w.level[l] == 0) continue;
        for (int xl = 0; xl < grid_.x_levels(); ++xl) {
            const int i = grid_.index(xl, l);
            da[i] += w.won[l] * a[i] / w.level[l];
        }
    }
}

// What patch p sends towards one neighbour: m * permeability / |neighbourhood| times its
// densities clipped at 0 (as in patch_derivative).
void DeterministicOde::fill_sent(const std::vector<double>& y, std::size_t p) const {
    const std::size_t block = 2 * static_cast<std::size_t>(T_);
    for (int comp = 0; comp < 2; ++comp) {
        const double rate = send_rate_[2 * p + comp];
        const double* own = y.data() + p * block + comp * T_;
        double* out = sent_.data() + p * block + comp * T_;
        for (int i = 0; i < T_; ++i) out[i] = rate * std::max(0.0, own[i]);
    }
}

// Migration of patch p, pulled: m * permeability * y / |neighbourhood| leaves towards each
// neighbour (a flow towards a wall or off a reflecting edge stays home, off an absorbing
// edge it is lost), and what each neighbour sends towards p arrives. Rates from
// refresh_migration, what every patch sends from fill_sent.
void DeterministicOde::migration(const std::vector<double>&, std::size_t p, double* dydt_p) const {
    const std::size_t block = 2 * static_cast<std::size_t>(T_);
    const std::size_t size = block;
    const double* own = sent_.data() + p * block;
    for (int comp = 0; comp < 2; ++comp) {
        const double rate = send_rate_[2 * p + comp];
        if (!(rate > 0)) continue;
        const double leaving = out_rate_[2 * p + comp] / rate;  // directions that pass
        for (int i = comp * T_; i < (comp + 1) * T_; ++i) dydt_p[i] -= leaving * own[i];
    }
    for (std::size_t k = inflow_start_[p]; k < inflow_start_[p + 1]; ++k) {
        const double* theirs = sent_.data() + static_cast<std::size_t>(inflow_[k].from) * block;
        for (std::size_t i = 0; i < size; ++i) dydt_p[i] += theirs[i];
    }
}

void DeterministicOde::patch_derivative(const std::vector<double>& y, std::size_t p, std::vector<double>& dydt,
                                        Work& w) const {
    double* d = dydt.data() + active_index(p, 0);
    std::fill(d, d + 2 * T_, 0.0);
    const PatchConditions& c = where_[p];
    if (!(c.capacity > 0)) return;  // a wall holds nothing
    // Rates are taken at the densities clipped at 0. The integrator may carry a density that
    // is truly 0 a little below it; taken as it is, such a value can grow away from 0 (a
    // negative recipient at the top of its level gains from its own birth rate, and a level
    // whose sum nearly cancels divides a whole-copy gain by almost 0). Clipped, it only
    // receives, which brings it back; for every non-negative state nothing changes.
    w.clipped.resize(2 * static_cast<std::size_t>(T_));
    const double* own = y.data() + active_index(p, 0);
    for (int k = 0; k < 2 * T_; ++k) w.clipped[k] = std::max(0.0, own[k]);
    local(w.clipped.data(), w.clipped.data() + T_, c, d, d + T_, w);
    if (migrates_) migration(y, p, d);
}

void DeterministicOde::operator()(const std::vector<double>& y, std::vector<double>& dydt, double) const {
    dydt.resize(y.size());
    const std::size_t P = where_.size();
    if (migrates_) sent_.resize(y.size());
    if (P < parallel_min_patches) {
        Work w;
        for (std::size_t p = 0; migrates_ && p < P; ++p) fill_sent(y, p);
        for (std::size_t p = 0; p < P; ++p) patch_derivative(y, p, dydt, w);
        return;
    }
    // Blocks of patches, one work space each; every patch is still computed alone. First
    // what every patch sends, then each patch's derivative (its own terms and what its
    // neighbours sent, summed in a fixed order).
    constexpr std::size_t block = 64;
    const std::size_t blocks = (P + block - 1) / block;
    if (migrates_) {
        parallel_for(std::size_t{0}, blocks, [&](std::size_t b) {
            const std::size_t end = std::min(P, (b + 1) * block);
            for (std::size_t p = b * block; p < end; ++p) fill_sent(y, p);
        });
    }
    parallel_for(std::size_t{0}, blocks, [&](std::size_t b) {
        Work w;
        const std::size_t end = std::min(P, (b + 1) * block);
        for (std::size_t p = b * block; p < end; ++p) patch_derivative(y, p, dydt, w);
    });
}

}  // namespace tessera
