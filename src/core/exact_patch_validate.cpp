// The validate mode's check of an exact patch (docs/reliability.md): every kept sum against a
// recomputation from the counts.
#include "core/exact_patch.hpp"

#include <cmath>
#include <string>

namespace tessera {

std::string ExactPatch::check_kept_sums() const {
    if (!A_ || !D_) return "";
    std::string problems;
    auto integer = [&](const char* what, std::int64_t kept, std::int64_t fresh) {
        if (kept != fresh)
            problems += std::string(problems.empty() ? "" : "; ") + what + " kept " + std::to_string(kept) +
                        ", recomputed " + std::to_string(fresh);
    };
    // Incremental updates since the last rebuild (at most resum_interval events) round each
    // addition by a relative 1e-16 of the sum at the time; even a population that falls from
    // 65536 cells to none leaves under 1e-6 of one cell's rate. One cell missed from a sum
    // is a whole rate off.
    auto floating = [&](const char* what, double kept, double fresh, double scale) {
        if (!(std::fabs(kept - fresh) <= 1e-6 * std::max(std::fabs(fresh), scale)))
            problems += std::string(problems.empty() ? "" : "; ") + what + " kept " + std::to_string(kept) +
                        ", recomputed " + std::to_string(fresh);
    };
    const double birth_scale = *std::max_element(rates_.birth.begin(), rates_.birth.end());
    const double death_scale = *std::max_element(rates_.death.begin(), rates_.death.end());
    const double competition_scale = *std::max_element(rates_.competition.begin(), rates_.competition.end());
    std::int64_t active = 0, dormant = 0, below = 0;
    uint128 pairs = 0;
    double birth = 0, death = 0, competition = 0;
    std::vector<std::int64_t> level(static_cast<std::size_t>(ny_), 0);
    for (int x = 0; x < nx_; ++x) {
        double b = 0, d = 0, c = 0;
        std::int64_t act = 0, dor = 0;
        for (int y = 0; y < ny_; ++y) {
            const int i = x * ny_ + y;
            if (A_[i] < 0 || D_[i] < 0)
                integer(("count of trait " + std::to_string(i)).c_str(), std::min(A_[i], D_[i]), 0);
            b += rates_.birth[i] * static_cast<double>(A_[i]);
            d += rates_.death[i] * static_cast<double>(A_[i]);
            c += rates_.competition[i] * static_cast<double>(A_[i]);
            act += A_[i];
            dor += D_[i];
            level[static_cast<std::size_t>(y)] += A_[i];
        }
        const std::string row = " of row " + std::to_string(x);
        integer(("active cells" + row).c_str(), active_rows_[x], act);
        integer(("dormant cells" + row).c_str(), dormant_rows_[x], dor);
        floating(("birth sum" + row).c_str(), birth_rows_[x], b, birth_scale);
        if (!death_uniform_) floating(("death sum" + row).c_str(), death_rows_[x], d, death_scale);
        if (!competition_uniform_) floating(("competition sum" + row).c_str(), competition_rows_[x], c, competition_scale);
        active += act;
        dormant += dor;
        birth += b;
        death += d;
        competition += c;
    }
    for (int l = 0; l < ny_; ++l) {
        integer(("active cells at transfer level " + std::to_string(l)).c_str(), transfer_level_[l],
                level[static_cast<std::size_t>(l)]);
        pairs += static_cast<uint128>(below) * static_cast<uint128>(level[static_cast<std::size_t>(l)]);
        below += level[static_cast<std::size_t>(l)];
    }
    integer("active cells", active_total_, active);
    integer("dormant cells", dormant_total_, dormant);
    if (transfer_pairs_ != pairs)
        problems += std::string(problems.empty() ? "" : "; ") + "conjugation pairs kept " +
                    std::to_string(static_cast<double>(transfer_pairs_)) + ", recomputed " +
                    std::to_string(static_cast<double>(pairs));
    floating("birth sum", birth_sum_, birth, birth_scale);
    if (!death_uniform_) floating("death sum", death_sum_, death, death_scale);
    if (!competition_uniform_) floating("competition sum", competition_sum_, competition, competition_scale);
    return problems;
}

}  // namespace tessera
