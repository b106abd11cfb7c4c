// LeapPatch::channels_of, the one place that lists a species' channels (its own events and
// its conjugations), shared by the files that build, bound and simulate them.
#pragma once

#include "core/leap_patch.hpp"

namespace tessera {

template <class F>
void LeapPatch::channels_of(int k, bool own, const std::uint8_t* level_mask, const double* L, F&& f) const {
    if (k >= T_) {
        if (own) {
            f(rates_.dormant_death, true, -1, -1, Kind::dormant_death);
            f(resus_, true, k - T_, -1, Kind::resuscitation);
        }
        return;
    }
    const int i = k;
    if (own) {
        const double birth = rates_.birth[i];
        f(birth * self_share_[i], false, i, -1, Kind::birth);
        for (const Mutant& m : mutants_[i]) f(birth * m.probability, false, m.trait, -1, Kind::mutant_birth);
        f(rates_.death[i] + stress_, true, -1, -1, Kind::death);
        const double q = rates_.dormancy_probability[i];
        f(competition_[i] * (1 - q), true, -1, -1, Kind::competition_death);
        f(competition_[i] * q, true, T_ + i, -1, Kind::dormancy);
    }
    const bool whole = rates_.transfer_copies == TransferCopies::whole;
    for (int l = grid_.y_level(i) + 1; l < ny_; ++l) {
        if (!level_mask[l]) continue;
        f(conj_factor_ * L[l], true, whole ? -1 : grid_.index(grid_.x_level(i), l), l, Kind::conjugation);
    }
}

}  // namespace tessera
