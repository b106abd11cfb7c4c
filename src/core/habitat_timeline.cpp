#include "core/habitat_timeline.hpp"

#include <cmath>
#include <limits>

namespace tessera {

namespace {

// Is t inside a window [start, end) repeated every `every` (0: once)?
bool inside(double t, double start, double end, double every) {
    if (t < start) return false;
    if (every <= 0) return t < end;
    const double phase = std::fmod(t - start, every);
    return phase < end - start;
}

}  // namespace

HabitatTimeline::HabitatTimeline(const Scenario& s) {
    for (const Habitat& h : s.habitats) {
        base_.push_back({h.capacity, h.stress, h.resuscitation, h.permeability});
    }
    for (std::size_t k = 0; k < s.schedules.size(); ++k) {
        const Schedule& sc = s.schedules[k];
        int index = -1;
        for (std::size_t i = 0; i < s.habitats.size(); ++i) {
            if (s.habitats[i].name == sc.habitat) index = static_cast<int>(i);
        }
        if (index < 0) continue;  // the loader rejects unknown classes
        windows_.push_back({index, k, s.to_plain(sc.start), s.to_plain(sc.end), s.to_plain(sc.every), sc});
    }
}

std::vector<PatchConditions> HabitatTimeline::at(double t) const {
    std::vector<PatchConditions> now = base_;
    for (const Window& w : windows_) {
        if (!inside(t, w.start, w.end, w.every)) continue;
        PatchConditions& c = now[w.habitat];
        if (w.changes.capacity) c.capacity = *w.changes.capacity;
        if (w.changes.stress) c.stress = *w.changes.stress;
        if (w.changes.resuscitation) c.resuscitation = *w.changes.resuscitation;
        if (w.changes.permeability) c.permeability = *w.changes.permeability;
    }
    return now;
}

bool HabitatTimeline::on(std::size_t schedule, double t) const {
    for (const Window& w : windows_) {
        if (w.schedule == schedule) return inside(t, w.start, w.end, w.every);
    }
    return false;
}

double HabitatTimeline::next_change_after(double t) const {
    double next = std::numeric_limits<double>::infinity();
    for (const Window& w : windows_) {
        if (w.every <= 0) {
            if (w.start > t) next = std::min(next, w.start);
            if (w.end > t) next = std::min(next, w.end);
            continue;
        }
        // The repetition whose start is the last one at or before t, and the one after.
        const double k = t < w.start ? 0.0 : std::floor((t - w.start) / w.every);
        for (double j = k; j <= k + 1; ++j) {
            const double on = w.start + j * w.every;
            const double off = on + (w.end - w.start);
            if (on > t) next = std::min(next, on);
            if (off > t) next = std::min(next, off);
        }
    }
    return next;
}

}  // namespace tessera
