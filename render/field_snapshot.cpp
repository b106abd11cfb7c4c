#include "render/field_snapshot.hpp"

#include <algorithm>
#include <cmath>

#include "core/habitat_timeline.hpp"

namespace tessera {

double FieldSnapshot::stress_scale() const {
    double top = 0.0;
    for (const Habitat& h : scenario.habitats) top = std::max(top, h.stress);
    for (const Schedule& s : scenario.schedules) top = std::max(top, s.stress.value_or(0.0));
    return top;
}

FieldSnapshot make_snapshot(const Scenario& scenario, double t) {
    FieldSnapshot s;
    s.scenario = scenario;
    s.grid = TraitGrid(scenario.dormancy_axis, scenario.transfer_axis);
    s.width = scenario.width;
    s.height = scenario.height;
    s.t = t;
    s.t_logK = t / std::log(scenario.K);
    s.active.assign(s.patches() * s.traits(), 0);
    s.dormant.assign(s.active.size(), 0);
    // Conditions from the timeline at t itself, not the engine's (which are those of the
    // step that just ended), so a live frame and a frame re-rendered from fields.h5 agree.
    s.conditions = HabitatTimeline(scenario).at(t);
    return s;
}

FieldSnapshot snapshot_of(const Engine& engine) {
    FieldSnapshot s = make_snapshot(engine.scenario(), engine.time());
    update_snapshot(s, engine);
    return s;
}

void update_snapshot(FieldSnapshot& into, const Engine& engine) {
    const double previous = into.t;
    into.t = engine.time();
    into.t_logK = engine.time_logK();
    into.active = engine.lattice().all_active();
    into.dormant = engine.lattice().all_dormant();
    if (into.t != previous || into.conditions.empty()) into.conditions = HabitatTimeline(into.scenario).at(into.t);
}

}  // namespace tessera
