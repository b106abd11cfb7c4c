// The one patch the exponent limit describes: its trait grid, rates and conditions over
// t / ln K (the patch's habitat class with its [[schedule]] windows), and the deterministic
// limit of model.md section 5 under given conditions. Compartments are numbered as in
// core/deterministic_ode.hpp for patch 0: active cells of trait i at i, dormant at T + i.
#pragma once

#include <vector>

#include "core/deterministic_ode.hpp"
#include "core/habitat_timeline.hpp"
#include "core/patch_conditions.hpp"
#include "core/rate_table.hpp"
#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

class LimitModel {
public:
    // Precondition: one patch (limit_not_applicable is nullopt).
    explicit LimitModel(const Scenario& scenario);

    const Scenario& scenario() const { return scenario_; }
    const TraitGrid& grid() const { return grid_; }
    const RateTable& rates() const { return rates_; }
    int traits() const { return grid_.size(); }
    int compartments() const { return 2 * grid_.size(); }
    double log_K() const { return log_K_; }

    // The patch's conditions on the open interval (s0, s1) of t / ln K (constant there when
    // s1 is at most next_change_after(s0)).
    PatchConditions conditions_between(double s0, double s1) const;
    // The first t / ln K after s at which the patch's conditions change (infinity if never).
    double next_change_after(double s) const;

    // The deterministic limit (mutation off) under `conditions`.
    DeterministicOde ode(const PatchConditions& conditions) const;
    // The same below exponent 1, where N / K -> 0: competition, dormancy induction and the
    // density form of transfer vanish (a capacity of below_one_capacity), the frequency form
    // of transfer stays.
    DeterministicOde ode_below_one(PatchConditions conditions) const;
    // Capacity standing for "infinitely far below K": N / (c K) is then below 1e-100 for any
    // density of order one, far under every rate's rounding.
    static constexpr double below_one_capacity = 1e100;

private:
    // Next change of any window of the class strictly after plain time t + a rounding margin.
    double next_window_change(double t) const;

    Scenario scenario_;  // the one patch; only the schedules of its own class
    TraitGrid grid_;
    RateTable rates_;
    HabitatTimeline timeline_;
    int habitat_;
    double log_K_;
};

// Initial count of every compartment (active 0..T-1, dormant T..2T-1) from the inocula, as
// the engine puts them (an `exponent` inoculum gives K_p^exponent active cells).
std::vector<double> initial_counts(const LimitModel& model);

}  // namespace tessera
