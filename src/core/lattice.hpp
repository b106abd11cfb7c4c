// The state: a W x H lattice of patches, each holding active and dormant counts per trait.
// Hot data only, one dense array per compartment laid out [patch][trait] so that the
// engines walk it in order; names and colours of habitats live in the Scenario.
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

namespace tessera {

struct PatchIndex {
    std::uint32_t value = 0;
};

class Lattice {
public:
    Lattice(int width, int height, int traits)
        : width_(width),
          height_(height),
          traits_(traits),
          active_(static_cast<std::size_t>(width) * height * traits, 0),
          dormant_(active_.size(), 0) {}

    int width() const { return width_; }
    int height() const { return height_; }
    int traits() const { return traits_; }
    std::size_t patches() const { return static_cast<std::size_t>(width_) * height_; }
    // Patches are numbered row by row, top row first: index = row * width + col.
    std::size_t patch_at(int col, int row) const { return static_cast<std::size_t>(row) * width_ + col; }

    std::int64_t* active(std::size_t patch) { return active_.data() + patch * traits_; }
    std::int64_t* dormant(std::size_t patch) { return dormant_.data() + patch * traits_; }
    const std::int64_t* active(std::size_t patch) const { return active_.data() + patch * traits_; }
    const std::int64_t* dormant(std::size_t patch) const { return dormant_.data() + patch * traits_; }

    const std::vector<std::int64_t>& all_active() const { return active_; }
    const std::vector<std::int64_t>& all_dormant() const { return dormant_; }

private:
    int width_;
    int height_;
    int traits_;
    std::vector<std::int64_t> active_;
    std::vector<std::int64_t> dormant_;
};

}  // namespace tessera
