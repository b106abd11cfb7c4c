// The state: a W x H lattice of patches, each holding active and dormant counts per trait.
// Hot data only, one dense array per compartment laid out [patch][trait] so that the
// engines walk it in order; names and colours of habitats live in the Scenario.
//
// Patches are always named by their number on the whole lattice, but a lattice may hold the
// counts of a range of whole rows only (a process of a split run holds its own band:
// core/lattice_partition.hpp); the patches outside that range have no storage at all.
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
    // Holds rows [first_row, end_row); end_row < 0: every row.
    Lattice(int width, int height, int traits, int first_row = 0, int end_row = -1)
        : width_(width), height_(height), traits_(traits) {
        hold_rows(first_row, end_row < 0 ? height : end_row);
    }

    int width() const { return width_; }
    int height() const { return height_; }
    int traits() const { return traits_; }
    std::size_t patches() const { return static_cast<std::size_t>(width_) * height_; }  // of the whole lattice
    // Patches are numbered row by row, top row first: index = row * width + col.
    std::size_t patch_at(int col, int row) const { return static_cast<std::size_t>(row) * width_ + col; }

    // The rows whose counts this lattice holds, and the number of their first patch.
    int first_row() const { return first_row_; }
    int end_row() const { return end_row_; }
    std::size_t first_patch() const { return static_cast<std::size_t>(first_row_) * width_; }
    std::size_t held_patches() const { return static_cast<std::size_t>(end_row_ - first_row_) * width_; }
    bool whole() const { return first_row_ == 0 && end_row_ == height_; }
    // Holds rows [first, end) from now on, every count zero; the old storage is released.
    void hold_rows(int first, int end) {
        first_row_ = first;
        end_row_ = end;
        const std::size_t n = static_cast<std::size_t>(end - first) * width_ * traits_;
        active_ = std::vector<std::int64_t>(n, 0);
        dormant_ = std::vector<std::int64_t>(n, 0);
    }

    // `patch` must be in the held rows.
    std::int64_t* active(std::size_t patch) { return active_.data() + (patch - first_patch()) * traits_; }
    std::int64_t* dormant(std::size_t patch) { return dormant_.data() + (patch - first_patch()) * traits_; }
    const std::int64_t* active(std::size_t patch) const { return active_.data() + (patch - first_patch()) * traits_; }
    const std::int64_t* dormant(std::size_t patch) const { return dormant_.data() + (patch - first_patch()) * traits_; }

    // The held rows' counts: the whole lattice's when whole().
    const std::vector<std::int64_t>& all_active() const { return active_; }
    const std::vector<std::int64_t>& all_dormant() const { return dormant_; }

private:
    int width_;
    int height_;
    int traits_;
    int first_row_ = 0;
    int end_row_ = 0;
    std::vector<std::int64_t> active_;
    std::vector<std::int64_t> dormant_;
};

}  // namespace tessera
