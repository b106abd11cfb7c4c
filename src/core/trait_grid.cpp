#include "core/trait_grid.hpp"

#include <cmath>

namespace tessera {

namespace {

double step_of(const TraitAxis& axis) {
    return axis.levels > 1 ? axis.max / (axis.levels - 1) : 0.0;
}

// The level whose value is `v`, if there is one; a one-level axis only holds 0.
std::optional<int> level_of(double v, double step, int levels) {
    if (levels == 1 || step == 0.0) {
        if (std::fabs(v) <= 1e-9) return 0;
        return std::nullopt;
    }
    double l = v / step;
    double r = std::round(l);
    if (std::fabs(l - r) > 1e-9 || r < 0 || r >= levels) return std::nullopt;
    return static_cast<int>(r);
}

}  // namespace

TraitGrid::TraitGrid(TraitAxis dormancy, TraitAxis transfer)
    : x_levels_(dormancy.levels),
      y_levels_(transfer.levels),
      dx_(step_of(dormancy)),
      dy_(step_of(transfer)) {}

std::optional<int> TraitGrid::find(double x, double y) const {
    auto xl = level_of(x, dx_, x_levels_);
    auto yl = level_of(y, dy_, y_levels_);
    if (!xl || !yl) return std::nullopt;
    return index(*xl, *yl);
}

}  // namespace tessera
