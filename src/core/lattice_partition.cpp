#include "core/lattice_partition.hpp"

#include <algorithm>

namespace tessera {

std::vector<int> cut_bands(const std::vector<double>& row_cost, int parts) {
    const int H = static_cast<int>(row_cost.size()), N = parts;
    std::vector<int> start(static_cast<std::size_t>(N) + 1, 0);
    start[static_cast<std::size_t>(N)] = H;
    double total = 0.0;
    for (double c : row_cost) total += c;
    if (!(total > 0)) {
        for (int k = 1; k < N; ++k) start[static_cast<std::size_t>(k)] = static_cast<int>((static_cast<long long>(k) * H) / N);
        return start;
    }
    std::vector<double> prefix(static_cast<std::size_t>(H) + 1, 0.0);  // cost of rows [0, r)
    for (std::size_t r = 0; r < static_cast<std::size_t>(H); ++r) prefix[r + 1] = prefix[r] + row_cost[r];
    int r = 0;
    for (int k = 1; k < N; ++k) {
        const double target = total * k / N;
        while (r < H && prefix[static_cast<std::size_t>(r)] < target) ++r;
        int cut = r;
        if (cut > 0 && target - prefix[static_cast<std::size_t>(cut) - 1] < prefix[static_cast<std::size_t>(cut)] - target) --cut;
        start[static_cast<std::size_t>(k)] = std::clamp(cut, start[static_cast<std::size_t>(k) - 1] + 1, H - (N - k));
    }
    return start;
}

std::vector<int> halo_rows(const std::vector<int>& starts, int q, bool periodic) {
    const int height = starts.back();
    const int first = starts[static_cast<std::size_t>(q)], end = starts[static_cast<std::size_t>(q) + 1];
    std::vector<int> rows;
    for (int row : {first - 1, end}) {
        if (row < 0 || row >= height) {
            if (!periodic) continue;
            row = (row + height) % height;
        }
        if (row >= first && row < end) continue;  // its own (a band that wraps onto itself)
        if (std::find(rows.begin(), rows.end(), row) != rows.end()) continue;
        rows.push_back(row);
    }
    return rows;
}

int band_of_row(const std::vector<int>& starts, int row) {
    return static_cast<int>(std::upper_bound(starts.begin(), starts.end(), row) - starts.begin()) - 1;
}

std::size_t halo_slot(RowBand band, int height, int row) {
    if (row >= band.first && row < band.end) return static_cast<std::size_t>(row - band.first) + 1;
    if (row == (band.first - 1 + height) % height) return 0;
    return static_cast<std::size_t>(band.end - band.first) + 1;
}

}  // namespace tessera
