#include "study/ensemble_statistics.hpp"

#include <algorithm>
#include <cmath>

namespace tessera {

double quantile_type7(const std::vector<double>& x, double p) {
    const double h = static_cast<double>(x.size() - 1) * p;
    const auto j = static_cast<std::size_t>(std::floor(h));  // 0-based index of x_j
    if (j + 1 >= x.size()) return x.back();
    const double frac = h - static_cast<double>(j);
    // x_j + frac (x_{j+1} - x_j), but exact when both are equal (no 0 * inf, no rounding).
    return x[j] == x[j + 1] ? x[j] : x[j] + frac * (x[j + 1] - x[j]);
}

EnsembleSummary summarize(std::vector<double> values) {
    std::sort(values.begin(), values.end());
    EnsembleSummary s;
    double sum = 0.0;
    for (double v : values) sum += v;  // in sorted order, so the result does not depend on replicate order
    s.mean = sum / static_cast<double>(values.size());
    s.median = quantile_type7(values, 0.5);
    s.q10 = quantile_type7(values, 0.1);
    s.q90 = quantile_type7(values, 0.9);
    return s;
}

}  // namespace tessera
