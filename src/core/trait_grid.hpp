// The two-axis trait grid: dormancy ability x (major) and transfer ability y (minor).
// Trait index = x_level * y_levels + y_level, the fixed order of every output.
#pragma once

#include <optional>

#include "core/scenario.hpp"

namespace tessera {

class TraitGrid {
public:
    TraitGrid(TraitAxis dormancy, TraitAxis transfer);

    int size() const { return x_levels_ * y_levels_; }
    int x_levels() const { return x_levels_; }
    int y_levels() const { return y_levels_; }
    int x_level(int trait) const { return trait / y_levels_; }
    int y_level(int trait) const { return trait % y_levels_; }
    int index(int x_level, int y_level) const { return x_level * y_levels_ + y_level; }

    // Trait coordinates (the values users write, not the level numbers).
    double dormancy(int trait) const { return x_level(trait) * dx_; }
    double transfer(int trait) const { return y_level(trait) * dy_; }
    double dormancy_max() const { return (x_levels_ - 1) * dx_; }
    double transfer_max() const { return (y_levels_ - 1) * dy_; }

    // The trait at coordinates (x, y), if both lie on a level (to 1e-9 of the step).
    std::optional<int> find(double x, double y) const;

private:
    int x_levels_;
    int y_levels_;
    double dx_;  // 0 when the axis has one level
    double dy_;
};

}  // namespace tessera
