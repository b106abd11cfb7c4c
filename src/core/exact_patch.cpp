#include "core/exact_patch.hpp"

#include <cmath>

namespace tessera {

namespace {
// Incremental floating sums drift by rounding; they are rebuilt from the counts this often.
constexpr std::uint64_t resum_interval = 1u << 16;
}  // namespace

ExactPatch::ExactPatch(const TraitGrid& grid, const RateTable& rates, double K)
    : grid_(grid),
      rates_(rates),
      K_(K),
      nx_(grid.x_levels()),
      ny_(grid.y_levels()),
      birth_rows_(nx_),
      death_rows_(nx_),
      competition_rows_(nx_),
      active_rows_(nx_),
      dormant_rows_(nx_),
      transfer_level_(ny_) {}

void ExactPatch::load(std::int64_t* active, std::int64_t* dormant, const PatchConditions& where) {
    A_ = active;
    D_ = dormant;
    const double Kp = K_ * where.capacity;
    inv_Kp_ = Kp > 0 ? 1.0 / Kp : 0.0;
    stress_ = where.stress;
    const double resus = rates_.resuscitation * where.resuscitation;
    dormant_rate_ = rates_.dormant_death + resus;
    dormant_death_share_ = dormant_rate_ > 0 ? rates_.dormant_death / dormant_rate_ : 0.0;
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
        transfer_pairs_ += below * transfer_level_[l];
        below += transfer_level_[l];
    }
}

void ExactPatch::add_active(int i, std::int64_t delta) {
    const int x = i / ny_;
    const int y = i - x * ny_;
    const double dd = static_cast<double>(delta);
    // Pairs across transfer levels: one cell more at level y pairs with every active cell at
    // another level; one fewer removes as many (counted after the removal).
    if (delta > 0) {
        transfer_pairs_ += delta * (active_total_ - transfer_level_[y]);
        A_[i] += delta;
        active_total_ += delta;
        transfer_level_[y] += delta;
    } else {
        A_[i] += delta;
        active_total_ += delta;
        transfer_level_[y] += delta;
        transfer_pairs_ += delta * (active_total_ - transfer_level_[y]);
    }
    active_rows_[x] += delta;
    birth_rows_[x] += dd * rates_.birth[i];
    death_rows_[x] += dd * rates_.death[i];
    competition_rows_[x] += dd * rates_.competition[i];
    birth_sum_ += dd * rates_.birth[i];
    death_sum_ += dd * rates_.death[i];
    competition_sum_ += dd * rates_.competition[i];
}

void ExactPatch::add_dormant(int i, std::int64_t delta) {
    D_[i] += delta;
    dormant_rows_[i / ny_] += delta;
    dormant_total_ += delta;
}

double ExactPatch::total_rate() const {
    if (active_total_ == 0 && dormant_total_ == 0) return 0.0;
    const double na = static_cast<double>(active_total_);
    const double nc = na + (rates_.competition_counts_dormant ? static_cast<double>(dormant_total_) : 0.0);
    double r = static_cast<double>(dormant_total_) * dormant_rate_;
    if (active_total_ > 0) {
        const double tau = rates_.transfer_form == TransferForm::frequency ? rates_.transfer / na
                                                                           : rates_.transfer * inv_Kp_;
        r += birth_sum_ + death_sum_ + stress_ * na + competition_sum_ * nc * inv_Kp_ +
             tau * static_cast<double>(transfer_pairs_);
    }
    return r;
}

// The trait chosen with probability rate[i] * A[i] / sum, given u uniform on [0, sum).
// Rounding in the kept sums can leave u past the last positive weight; the last trait with
// positive weight is then taken. Returns -1 only when no trait has positive weight.
int ExactPatch::pick_by_rate(const std::vector<double>& row_sums, const std::vector<double>& rate,
                             double u) const {
    int last = -1;
    for (int x = 0; x < nx_; ++x) {
        if (!(row_sums[x] > 0)) continue;
        const bool here = u < row_sums[x];
        if (!here && x + 1 < nx_) {
            u -= row_sums[x];
            continue;
        }
        const int base = x * ny_;
        for (int y = 0; y < ny_; ++y) {
            const double w = rate[base + y] * static_cast<double>(A_[base + y]);
            if (w > 0) {
                last = base + y;
                if (u < w) return last;
                u -= w;
            }
        }
        if (last >= 0) return last;
        u = 0;  // this row's sum was only rounding residue: take the next positive weight
    }
    return last;
}

// The trait of the r-th cell (0-based) in trait order, given per-row totals of `counts`.
int ExactPatch::pick_cell(const std::vector<std::int64_t>& rows, const std::int64_t* counts,
                          std::uint64_t r) const {
    for (int x = 0; x < nx_; ++x) {
        const auto row = static_cast<std::uint64_t>(rows[x]);
        if (r >= row) {
            r -= row;
            continue;
        }
        const int base = x * ny_;
        for (int y = 0; y < ny_; ++y) {
            const auto c = static_cast<std::uint64_t>(counts[base + y]);
            if (r < c) return base + y;
            r -= c;
        }
    }
    return -1;  // unreachable while the kept sums are right
}

int ExactPatch::pick_in_column(int y_level, std::uint64_t r) const {
    for (int x = 0; x < nx_; ++x) {
        const int i = x * ny_ + y_level;
        const auto a = static_cast<std::uint64_t>(A_[i]);
        if (r < a) return i;
        r -= a;
    }
    return -1;  // unreachable while the kept sums are right
}

// One conjugation: a (recipient, donor) pair drawn uniformly among the pairs whose donor
// sits at a higher transfer level. Integer draws, so no rounding enters the choice.
void ExactPatch::conjugate(Rng& rng) {
    std::uint64_t r = rng.below(static_cast<std::uint64_t>(transfer_pairs_));
    // Recipient level l has weight L[l] * (cells above l).
    std::int64_t above = active_total_;
    int l = 0;
    for (; l < ny_; ++l) {
        above -= transfer_level_[l];
        const auto w = static_cast<std::uint64_t>(transfer_level_[l] * above);
        if (r < w) break;
        r -= w;
    }
    // r is uniform on [0, L[l] * above): split into recipient rank and donor rank.
    const auto above_u = static_cast<std::uint64_t>(above);
    const int recipient = pick_in_column(l, r / above_u);
    std::uint64_t donor_rank = r % above_u;
    int donor = -1;
    for (int m = l + 1; m < ny_; ++m) {
        const auto w = static_cast<std::uint64_t>(transfer_level_[m]);
        if (donor_rank < w) {
            donor = pick_in_column(m, donor_rank);
            break;
        }
        donor_rank -= w;
    }
    const int target = rates_.transfer_copies == TransferCopies::whole
                           ? donor
                           : grid_.index(grid_.x_level(recipient), grid_.y_level(donor));
    add_active(recipient, -1);
    add_active(target, +1);
}

void ExactPatch::divide(int parent, Rng& rng, EventCounts& counts) {
    int child = parent;
    if (rates_.mutation_probability > 0 && rng.uniform() < rates_.mutation_probability) {
        const bool back = rates_.mutation_backward > 0 && rng.uniform() < rates_.mutation_backward;
        const MutationTargets& t = back ? rates_.backward[parent] : rates_.forward[parent];
        if (t.count == 2) {
            child = t.trait[rng() >> 63];
        } else if (t.count == 1) {
            child = t.trait[0];
        }
        if (child != parent) ++counts.mutations;
    }
    add_active(child, +1);
    ++counts.births;
}

std::uint64_t ExactPatch::advance(std::int64_t* active, std::int64_t* dormant,
                                  const PatchConditions& where, double duration, Rng& rng,
                                  EventCounts& counts) {
    load(active, dormant, where);
    const bool frequency = rates_.transfer_form == TransferForm::frequency;
    const bool count_dormant = rates_.competition_counts_dormant;
    std::uint64_t events = 0;
    double t = 0.0;
    for (;;) {
        if ((events & (resum_interval - 1)) == resum_interval - 1) recompute_sums();
        const double na = static_cast<double>(active_total_);
        const double nd = static_cast<double>(dormant_total_);
        double r_birth = 0, r_death = 0, r_comp = 0, r_conj = 0;
        if (active_total_ > 0) {
            r_birth = birth_sum_;
            r_death = death_sum_ + stress_ * na;
            r_comp = competition_sum_ * (count_dormant ? na + nd : na) * inv_Kp_;
            r_conj = (frequency ? rates_.transfer / na : rates_.transfer * inv_Kp_) *
                     static_cast<double>(transfer_pairs_);
        }
        const double r_dorm = dormant_rate_ * nd;
        const double total = r_birth + r_death + r_comp + r_conj + r_dorm;
        if (!(total > 0)) break;
        t += rng.exponential() / total;
        if (t >= duration) break;
        ++events;

        double u = rng.uniform() * total;
        if (u < r_birth) {
            const int i = pick_by_rate(birth_rows_, rates_.birth, u);
            if (i >= 0) divide(i, rng, counts);
            continue;
        }
        u -= r_birth;
        if (u < r_death) {
            // Natural death (trait-dependent) or stress (the same for every active cell).
            int i;
            if (u < death_sum_) {
                i = pick_by_rate(death_rows_, rates_.death, u);
            } else {
                i = pick_cell(active_rows_, A_, rng.below(static_cast<std::uint64_t>(active_total_)));
            }
            if (i >= 0) {
                add_active(i, -1);
                ++counts.deaths;
            }
            continue;
        }
        u -= r_death;
        if (u < r_comp) {
            const int i = pick_by_rate(competition_rows_, rates_.competition, u * (competition_sum_ / r_comp));
            if (i < 0) continue;
            add_active(i, -1);
            if (rates_.dormancy_probability[i] > 0 && rng.uniform() < rates_.dormancy_probability[i]) {
                add_dormant(i, +1);
                ++counts.dormancies;
            } else {
                ++counts.competition_deaths;
            }
            continue;
        }
        u -= r_comp;
        if (u < r_conj && transfer_pairs_ > 0) {
            conjugate(rng);
            ++counts.conjugations;
            continue;
        }
        if (dormant_total_ > 0) {
            const int i = pick_cell(dormant_rows_, D_, rng.below(static_cast<std::uint64_t>(dormant_total_)));
            add_dormant(i, -1);
            if (rng.uniform() < dormant_death_share_) {
                ++counts.dormant_deaths;
            } else {
                add_active(i, +1);
                ++counts.resuscitations;
            }
        }
    }
    return events;
}

}  // namespace tessera
