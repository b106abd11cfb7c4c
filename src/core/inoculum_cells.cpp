#include "core/inoculum_cells.hpp"

#include <algorithm>
#include <cmath>

namespace tessera {

void for_each_inoculum_cell(const Scenario& s, const TraitGrid& traits, const std::vector<PatchConditions>& classes,
                            const std::function<void(std::size_t patch, int trait, double active, double dormant)>& put) {
    for (const Inoculum& in : s.inocula) {
        const auto trait = traits.find(in.dormancy, in.transfer);
        if (!trait) continue;  // the loader rejects traits off the grid
        for (int row = 0; row < s.height; ++row) {
            for (int col = 0; col < s.width; ++col) {
                const std::size_t p = static_cast<std::size_t>(row) * s.width + col;
                const int cls = s.habitat_of_patch[p];
                bool here = false;
                switch (in.where) {
                    case Inoculum::Where::all: here = true; break;
                    case Inoculum::Where::habitat: here = s.habitats[cls].name == in.habitat; break;
                    case Inoculum::Where::patch: here = col == in.x0 && row == in.y0; break;
                    case Inoculum::Where::rect:
                        here = col >= std::min(in.x0, in.x1) && col <= std::max(in.x0, in.x1) &&
                               row >= std::min(in.y0, in.y1) && row <= std::max(in.y0, in.y1);
                        break;
                }
                const double capacity = classes[cls].capacity;
                if (!here || capacity <= 0) continue;
                const double active = in.exponent ? std::pow(s.K * capacity, *in.exponent) : in.active.value_or(0.0);
                put(p, *trait, active, in.dormant);
            }
        }
    }
}

}  // namespace tessera
