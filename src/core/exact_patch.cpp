// The exact direct-method engine of one patch: every local event, the kept sums that make
// each one cost the same whatever the number of traits, and the choice of who takes part.
#include "core/exact_patch.hpp"

#include <algorithm>
#include <cmath>

namespace tessera {

namespace {
// Incremental floating sums drift by rounding; they are rebuilt from the counts this often.
constexpr std::uint64_t resum_interval = 1u << 16;
}  // namespace

void ExactPatch::add_active(int i, std::int64_t delta) {
    const int x = x_of_[i];
    const int y = y_of_[i];
    const double dd = static_cast<double>(delta);
    // Pairs across transfer levels: one cell more at level y pairs with every active cell at
    // another level; one fewer removes as many (counted after the removal).
    // (uint128 arithmetic is modulo 2^128, so adding a negative change wraps to the right,
    // non-negative result.)
    if (delta > 0) {
        transfer_pairs_ += static_cast<uint128>(delta) * static_cast<uint128>(active_total_ - transfer_level_[y]);
        A_[i] += delta;
        active_total_ += delta;
        transfer_level_[y] += delta;
    } else {
        A_[i] += delta;
        active_total_ += delta;
        transfer_level_[y] += delta;
        transfer_pairs_ -= static_cast<uint128>(-delta) * static_cast<uint128>(active_total_ - transfer_level_[y]);
    }
    active_rows_[x] += delta;
    const double db = dd * rates_.birth[i];
    birth_rows_[x] += db;
    birth_sum_ += db;
    // Sums of trait-independent rates are (rate) x (cells): nothing to keep.
    if (!death_uniform_) {
        const double d = dd * rates_.death[i];
        death_rows_[x] += d;
        death_sum_ += d;
    }
    if (!competition_uniform_) {
        const double c = dd * rates_.competition[i];
        competition_rows_[x] += c;
        competition_sum_ += c;
    }
}

void ExactPatch::add_dormant(int i, std::int64_t delta) {
    D_[i] += delta;
    dormant_rows_[x_of_[i]] += delta;
    dormant_total_ += delta;
}

// Inlined into the event loop (it runs once per event); the per-call constants come from
// attach().
[[gnu::always_inline]] inline ExactPatch::ChannelRates ExactPatch::channel_rates() const {
    ChannelRates r;
    const double nd = static_cast<double>(dormant_total_);
    r.dormant = dormant_rate_ * nd;
    if (active_total_ > 0) {
        const double na = static_cast<double>(active_total_);
        r.birth = birth_sum_;
        r.death = death_uniform_ ? death_per_cell_ * na : death_sum_ + stress_ * na;
        r.competition = (competition_uniform_ ? na : competition_sum_) * competition_scale_ *
                        (count_dormant_ ? na + nd : na);
        // No pairs (one transfer level holds every active cell) is common: skip the division.
        if (transfer_pairs_ > 0) {
            r.conjugation = (frequency_ ? rates_.transfer / na : transfer_density_) *
                            static_cast<double>(transfer_pairs_);
        }
    }
    r.total = r.birth + r.death + r.competition + r.conjugation + r.dormant;
    return r;
}

double ExactPatch::total_rate() const {
    if (active_total_ == 0 && dormant_total_ == 0) return 0.0;
    return channel_rates().total;
}

// The trait chosen with probability rate[i] * A[i] / sum, given u uniform on [0, sum).
// Rounding in the kept sums can leave u past the last positive weight; the last trait with
// positive weight is then taken. Returns -1 only when no trait has positive weight.
int ExactPatch::pick_by_rate(const double* row_sums, const double* rate, double u) const {
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
int ExactPatch::pick_cell(const std::int64_t* rows, const std::int64_t* counts, std::uint64_t r) const {
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
    uint128 r = below_128(rng, transfer_pairs_);
    // Recipient level l has weight L[l] * (cells above l).
    std::int64_t above = active_total_;
    int l = 0;
    for (; l < ny_; ++l) {
        above -= transfer_level_[l];
        const uint128 w = static_cast<uint128>(transfer_level_[l]) * static_cast<uint128>(above);
        if (r < w) break;
        r -= w;
    }
    // r is uniform on [0, L[l] * above): split into recipient rank and donor rank (64-bit
    // division whenever r fits, as it nearly always does).
    const auto above_u = static_cast<std::uint64_t>(above);
    std::uint64_t recipient_rank = 0, donor_rank = 0;
    if (r >> 64 == 0) {
        const auto r64 = static_cast<std::uint64_t>(r);
        recipient_rank = r64 / above_u;
        donor_rank = r64 % above_u;
    } else {
        recipient_rank = static_cast<std::uint64_t>(r / above_u);
        donor_rank = static_cast<std::uint64_t>(r % above_u);
    }
    const int recipient = pick_in_column(l, recipient_rank);
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
                           : grid_.index(x_of_[recipient], y_of_[donor]);
    add_active(recipient, -1);
    add_active(target, +1);
}

void ExactPatch::divide(int parent, Rng& rng, EventCounts& counts) {
    int child = parent;
    // The same decision as rng.uniform() < mu, as an integer compare (threshold53).
    if (mu_threshold_ > 0 && (rng() >> 11) < mu_threshold_) {
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

// One event, given u uniform on [0, r.total): one uniform chooses the channel; what is left
// of it, uniform on the chosen channel's interval and independent of the choice, chooses
// the cell.
inline void ExactPatch::execute(double u, const ChannelRates& r, Rng& rng, EventCounts& counts) {
    if (u < r.birth) {
        const int i = pick_by_rate(birth_rows_.data(), rates_.birth.data(), u);
        if (i >= 0) divide(i, rng, counts);
        return;
    }
    u -= r.birth;
    if (u < r.death) {
        // Natural death (trait-dependent) or stress (the same for every active cell).
        int i;
        if (death_uniform_) {
            // u uniform on [0, (d + stress) Na): the cell of rank floor(u / (d + stress)),
            // capped against rounding at the top end.
            auto rank = static_cast<std::uint64_t>(u * inv_death_cell_);
            const auto na = static_cast<std::uint64_t>(active_total_);
            if (rank >= na) rank = na - 1;
            i = pick_cell(active_rows_.data(), A_, rank);
        } else if (u < death_sum_) {
            i = pick_by_rate(death_rows_.data(), rates_.death.data(), u);
        } else {
            i = pick_cell(active_rows_.data(), A_, rng.below(static_cast<std::uint64_t>(active_total_)));
        }
        if (i >= 0) {
            add_active(i, -1);
            ++counts.deaths;
        }
        return;
    }
    u -= r.death;
    if (u < r.competition) {
        int i;
        if (competition_uniform_) {
            // Every active cell meets competition at the same rate: a uniform cell (a fresh
            // integer draw, cheaper than dividing u by the per-cell rate).
            i = pick_cell(active_rows_.data(), A_, rng.below(static_cast<std::uint64_t>(active_total_)));
        } else {
            i = pick_by_rate(competition_rows_.data(), rates_.competition.data(),
                             u * (competition_sum_ / r.competition));
        }
        if (i < 0) return;
        add_active(i, -1);
        // The same decision as rng.uniform() < q(x) (threshold53).
        if (q_threshold_[i] > 0 && (rng() >> 11) < q_threshold_[i]) {
            add_dormant(i, +1);
            ++counts.dormancies;
        } else {
            ++counts.competition_deaths;
        }
        return;
    }
    u -= r.competition;
    if (u < r.conjugation && transfer_pairs_ > 0) {
        conjugate(rng);
        ++counts.conjugations;
        return;
    }
    if (dormant_total_ > 0) {
        const int i = pick_cell(dormant_rows_.data(), D_, rng.below(static_cast<std::uint64_t>(dormant_total_)));
        add_dormant(i, -1);
        if (rng.uniform() < dormant_death_share_) {
            ++counts.dormant_deaths;
        } else {
            add_active(i, +1);
            ++counts.resuscitations;
        }
    }
}

std::uint64_t ExactPatch::advance(std::int64_t* active, std::int64_t* dormant,
                                  const PatchConditions& where, double duration, Rng& rng,
                                  EventCounts& counts) {
    attach(active, dormant, where);
    std::uint64_t events = 0;
    std::uint64_t until_resum = resum_interval;
    double t = 0.0;
    for (;;) {
        if (--until_resum == 0) {
            recompute_sums();
            until_resum = resum_interval;
        }
        const ChannelRates r = channel_rates();
        if (!(r.total > 0)) break;
        t += rng.exponential() / r.total;
        if (t >= duration) break;
        ++events;
        execute(rng.uniform() * r.total, r, rng, counts);
    }
    return events;
}

void ExactPatch::fire(Rng& rng, EventCounts& counts) {
    const ChannelRates r = channel_rates();
    if (r.total > 0) execute(rng.uniform() * r.total, r, rng, counts);
}

int ExactPatch::active_cell(std::uint64_t rank) const { return pick_cell(active_rows_.data(), A_, rank); }
int ExactPatch::dormant_cell(std::uint64_t rank) const { return pick_cell(dormant_rows_.data(), D_, rank); }

}  // namespace tessera
