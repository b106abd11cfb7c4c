// Setting an exact patch up: its per-trait tables, attaching it to a patch's counts, and
// rebuilding every kept sum from the counts.
#include "core/exact_patch.hpp"

#include <cmath>

namespace tessera {

namespace {
// The threshold t such that, for a draw r of the Rng, (r >> 11) < t exactly when
// rng.uniform() < p, i.e. k * 2^-53 < p for the 53-bit integer k = r >> 11: t = ceil(p 2^53).
// The integer compare makes the same decision as the floating one, with fewer instructions.
std::uint64_t threshold53(double p) {
    if (!(p > 0)) return 0;
    if (p >= 1) return std::uint64_t{1} << 53;
    return static_cast<std::uint64_t>(std::ceil(std::ldexp(p, 53)));
}

bool all_equal(const std::vector<double>& v) {
    for (double x : v) {
        if (x != v.front()) return false;
    }
    return true;
}
}  // namespace

ExactPatch::ExactPatch(const TraitGrid& grid, const RateTable& rates, double K)
    : grid_(grid),
      rates_(rates),
      K_(K),
      nx_(grid.x_levels()),
      ny_(grid.y_levels()),
      x_of_(grid.size()),
      y_of_(grid.size()),
      q_threshold_(grid.size()),
      birth_rows_(nx_),
      death_rows_(nx_),
      competition_rows_(nx_),
      active_rows_(nx_),
      dormant_rows_(nx_),
      transfer_level_(ny_) {
    for (int i = 0; i < grid.size(); ++i) {
        x_of_[i] = grid.x_level(i);
        y_of_[i] = grid.y_level(i);
        q_threshold_[i] = threshold53(rates.dormancy_probability[i]);
    }
    mu_threshold_ = threshold53(rates.mutation_probability);
    death_uniform_ = all_equal(rates.death);
    competition_uniform_ = all_equal(rates.competition);
    death_rate_ = rates.death.front();
    competition_rate_ = rates.competition.front();
}

void ExactPatch::attach(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where) {
    A_ = active;
    D_ = dormant;
    const double Kp = K_ * where.capacity;
    inv_Kp_ = Kp > 0 ? 1.0 / Kp : 0.0;
    stress_ = where.stress;
    const double resus = rates_.resuscitation * where.resuscitation;
    dormant_rate_ = rates_.dormant_death + resus;
    dormant_death_share_ = dormant_rate_ > 0 ? rates_.dormant_death / dormant_rate_ : 0.0;
    death_per_cell_ = death_rate_ + stress_;
    // With trait-independent natural death, natural death and stress are one channel of
    // per-cell rate d + stress whose cell is uniform among the active cells.
    inv_death_cell_ = death_per_cell_ > 0 ? 1.0 / death_per_cell_ : 0.0;
    competition_scale_ = (competition_uniform_ ? competition_rate_ : 1.0) * inv_Kp_;
    transfer_density_ = rates_.transfer * inv_Kp_;
    frequency_ = rates_.transfer_form == TransferForm::frequency;
    count_dormant_ = rates_.competition_counts_dormant;
    recompute_sums();
}

void ExactPatch::recompute_sums() {
    active_total_ = dormant_total_ = 0;
    birth_sum_ = death_sum_ = competition_sum_ = 0.0;
    for (int l = 0; l < ny_; ++l) transfer_level_[l] = 0;
    for (int x = 0; x < nx_; ++x) {
        double b = 0, d = 0, c = 0;
        std::int64_t dor = 0, act = 0;
        for (int y = 0; y < ny_; ++y) {
            const int i = x * ny_ + y;
            const double a = static_cast<double>(A_[i]);
            b += rates_.birth[i] * a;
            d += rates_.death[i] * a;
            c += rates_.competition[i] * a;
            dor += D_[i];
            act += A_[i];
            transfer_level_[y] += A_[i];
        }
        birth_rows_[x] = b;
        death_rows_[x] = d;
        competition_rows_[x] = c;
        dormant_rows_[x] = dor;
        active_rows_[x] = act;
        active_total_ += act;
        birth_sum_ += b;
        death_sum_ += d;
        competition_sum_ += c;
        dormant_total_ += dor;
    }
    transfer_pairs_ = 0;
    std::int64_t below = 0;
    for (int l = 0; l < ny_; ++l) {
        transfer_pairs_ += static_cast<uint128>(below) * static_cast<uint128>(transfer_level_[l]);
        below += transfer_level_[l];
    }
}

}  // namespace tessera
