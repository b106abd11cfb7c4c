#include "theory/limit_model.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace tessera {

namespace {

Scenario one_patch(const Scenario& s) {
    Scenario p = s;
    if (p.habitats.empty()) p.habitats.push_back(Habitat{});
    if (p.habitat_of_patch.size() != 1) p.habitat_of_patch.assign(1, 0);
    // Windows of other classes never touch this patch; leaving them out keeps every change
    // the timeline reports a change of this patch.
    const std::string& mine = p.habitats[p.habitat_of_patch[0]].name;
    std::vector<Schedule> kept;
    for (const Schedule& sc : p.schedules) {
        if (sc.habitat == mine) kept.push_back(sc);
    }
    p.schedules = kept;
    return p;
}

bool same(const PatchConditions& a, const PatchConditions& b) {
    return a.capacity == b.capacity && a.stress == b.stress && a.resuscitation == b.resuscitation &&
           a.permeability == b.permeability;
}

}  // namespace

LimitModel::LimitModel(const Scenario& scenario)
    : scenario_(one_patch(scenario)),
      grid_(scenario_.dormancy_axis, scenario_.transfer_axis),
      rates_(grid_, scenario_.rates, scenario_.K),
      timeline_(scenario_),
      habitat_(scenario_.habitat_of_patch[0]),
      log_K_(std::log(scenario_.K)) {}

PatchConditions LimitModel::conditions_between(double s0, double s1) const {
    const double mid = std::isfinite(s1) ? 0.5 * (s0 + s1) : s0 + 1.0;
    return timeline_.at(mid * log_K_)[static_cast<std::size_t>(habitat_)];
}

double LimitModel::next_window_change(double t) const {
    // A boundary met again after a round trip through t / ln K (s * ln K may fall a rounding
    // below it) is not a new one.
    const double margin = 1e-9 * std::max(1.0, std::fabs(t));
    double next = timeline_.next_change_after(t);
    while (std::isfinite(next) && next <= t + margin) next = timeline_.next_change_after(next);
    return next;
}

double LimitModel::next_change_after(double s) const {
    // Schedule times are written in t / ln K (limit_not_applicable refuses plain ones) and
    // converted to plain time by the timeline; a window that sets a value already in force
    // changes nothing and is passed over.
    double t = s * log_K_;
    const PatchConditions now = timeline_.at(0.5 * (t + std::min(next_window_change(t), t + 2.0)))
                                    [static_cast<std::size_t>(habitat_)];
    for (int guard = 0; guard < 1000000; ++guard) {
        const double next = next_window_change(t);
        if (!std::isfinite(next)) return next;
        const double after = std::min(next_window_change(next), next + 2.0);
        if (!same(now, timeline_.at(0.5 * (next + after))[static_cast<std::size_t>(habitat_)])) return next / log_K_;
        t = next;
    }
    return std::numeric_limits<double>::infinity();
}

DeterministicOde LimitModel::ode(const PatchConditions& conditions) const {
    return DeterministicOde(scenario_, grid_, rates_, {conditions});
}

DeterministicOde LimitModel::ode_below_one(PatchConditions conditions) const {
    conditions.capacity = below_one_capacity;
    return DeterministicOde(scenario_, grid_, rates_, {conditions});
}

std::vector<double> initial_counts(const LimitModel& model) {
    const Scenario& s = model.scenario();
    const TraitGrid& g = model.grid();
    const int T = g.size();
    std::vector<double> counts(static_cast<std::size_t>(2 * T), 0.0);
    const double capacity = model.conditions_between(0.0, model.next_change_after(0.0)).capacity;
    const std::string& mine = s.habitats[s.habitat_of_patch[0]].name;
    for (const Inoculum& in : s.inocula) {
        const auto trait = g.find(in.dormancy, in.transfer);
        if (!trait) continue;  // the loader rejects traits off the grid
        bool here = true;      // the one patch is (0, 0)
        switch (in.where) {
            case Inoculum::Where::all: break;
            case Inoculum::Where::habitat: here = in.habitat == mine; break;
            case Inoculum::Where::patch: here = in.x0 == 0 && in.y0 == 0; break;
            case Inoculum::Where::rect: here = std::min(in.x0, in.x1) <= 0 && std::min(in.y0, in.y1) <= 0; break;
        }
        if (!here || capacity <= 0) continue;
        const double active = in.exponent ? std::pow(s.K * capacity, *in.exponent) : in.active.value_or(0.0);
        counts[static_cast<std::size_t>(*trait)] += std::round(active);
        counts[static_cast<std::size_t>(T + *trait)] += std::round(in.dormant);
    }
    return counts;
}

}  // namespace tessera
