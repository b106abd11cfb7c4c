// Parameter grids for sweeps: each `--vary` axis is a scenario key and a list of values
// (as text, exactly what is handed to the scenario loader as a `--set` override); the grid
// is their product. Point i runs the last axis fastest, like nested loops in the order the
// axes were given. No I/O: the caller prints errors and loads the points.
#pragma once

#include <cstddef>
#include <stdexcept>
#include <string>
#include <vector>

namespace tessera {

struct GridAxis {
    std::string key;                  // dotted scenario key, as given to --vary
    std::vector<std::string> values;  // value texts, in order
};

// A --vary specification that cannot be a grid axis; `key` is "" when even the key is missing.
class VaryError : public std::runtime_error {
public:
    VaryError(std::string key, const std::string& message)
        : std::runtime_error(message), key_(std::move(key)) {}
    const std::string& key() const { return key_; }

private:
    std::string key_;
};

// Number of significant digits of generated grid values: enough for any parameter a user
// sets by hand, few enough that 0.1 + 2 * 0.1 is written 0.3 (the text is what is used).
inline constexpr int grid_value_digits = 12;

// Parses "KEY=FROM:TO:N" (N values evenly spaced, both ends included), "KEY=log:FROM:TO:N"
// (evenly spaced in log, FROM and TO > 0) or "KEY=v1,v2,..." (the values as written; commas
// inside [...] or "..." do not split). N = 1 needs FROM = TO. Throws VaryError naming the
// key: no '=', empty key or values, N not a whole number >= 1, FROM or TO not a number, a
// range whose ends are equal with N > 1 (an empty range), log with an end <= 0, an empty
// list item.
GridAxis parse_vary(const std::string& spec);

class ParameterGrid {
public:
    ParameterGrid() = default;
    // Throws VaryError when two axes name the same key.
    explicit ParameterGrid(std::vector<GridAxis> axes);

    const std::vector<GridAxis>& axes() const { return axes_; }
    std::size_t size() const { return size_; }
    // The value index on each axis of point `point` (last axis fastest).
    std::vector<std::size_t> coordinates(std::size_t point) const;
    // The value texts of point `point`, one per axis.
    std::vector<std::string> values(std::size_t point) const;
    // "key=value" per axis, ready for the scenario loader's overrides.
    std::vector<std::string> overrides(std::size_t point) const;

private:
    std::vector<GridAxis> axes_;
    std::size_t size_ = 0;
};

}  // namespace tessera
