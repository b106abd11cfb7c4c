// Where a migrating cell may go: the 4 or 8 neighbours of a patch and the boundary rule.
#pragma once

#include <array>
#include <cstdint>

#include "core/scenario.hpp"

namespace tessera {

class Neighbourhood {
public:
    // Directions in a fixed order (N, E, S, W, then NE, SE, SW, NW), so that every run reads
    // and writes migrants in the same order.
    Neighbourhood(int width, int height, int size, Boundary boundary)
        : width_(width), height_(height), size_(size), boundary_(boundary) {}

    int size() const { return size_; }
    static int opposite(int direction) {
        if (direction < 4) return (direction + 2) % 4;
        return 4 + (direction - 4 + 2) % 4;
    }

    enum class Target { patch, off_edge };
    struct Destination {
        Target kind;
        std::int64_t patch;  // valid when kind == patch
    };

    // The patch a cell at (col, row) reaches by one jump in `direction`, wrapping when the
    // boundary is periodic; off_edge otherwise when the jump leaves the lattice.
    Destination step(int col, int row, int direction) const {
        int c = col + dx[direction];
        int r = row + dy[direction];
        if (c < 0 || c >= width_ || r < 0 || r >= height_) {
            if (boundary_ != Boundary::periodic) return {Target::off_edge, -1};
            c = (c + width_) % width_;
            r = (r + height_) % height_;
        }
        return {Target::patch, static_cast<std::int64_t>(r) * width_ + c};
    }

private:
    static constexpr std::array<int, 8> dx{0, 1, 0, -1, 1, 1, -1, -1};
    static constexpr std::array<int, 8> dy{-1, 0, 1, 0, -1, 1, 1, -1};
    int width_;
    int height_;
    int size_;
    Boundary boundary_;
};

}  // namespace tessera
