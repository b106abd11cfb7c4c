// Habitat classes as they are at a given time: the scenario's properties with every
// [[schedule]] window in force applied. All times here are plain model time.
#pragma once

#include <vector>

#include "core/patch_conditions.hpp"
#include "core/scenario.hpp"

namespace tessera {

class HabitatTimeline {
public:
    explicit HabitatTimeline(const Scenario& scenario);

    // The conditions of every class at time t (windows are [start, end)).
    std::vector<PatchConditions> at(double t) const;

    // Whether [[schedule]] number `schedule` (in file order) is in force at time t.
    bool on(std::size_t schedule, double t) const;

    // The first time after t at which some schedule switches on or off (infinity if none).
    double next_change_after(double t) const;

private:
    struct Window {
        int habitat;
        std::size_t schedule;      // its index in Scenario::schedules
        double start, end, every;  // plain time; every = 0: once
        Schedule changes;
    };
    std::vector<PatchConditions> base_;
    std::vector<Window> windows_;
};

}  // namespace tessera
