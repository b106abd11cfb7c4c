// Statistics of one quantity over the replicates of an ensemble (ensemble.csv): mean, median
// and the 10 % and 90 % quantiles. Quantiles are Hyndman & Fan's (1996, Amer. Statist.
// 50:361-365) type 7, the linear interpolation between order statistics at h = (n - 1) p
// (the default of R and of NumPy): with sorted values x_1..x_n, Q(p) = x_j + (h + 1 - j)
// (x_{j+1} - x_j), j = floor(h) + 1. No I/O.
#pragma once

#include <vector>

namespace tessera {

struct EnsembleSummary {
    double mean = 0.0;
    double median = 0.0;
    double q10 = 0.0;
    double q90 = 0.0;
};

// Type 7 quantile of `sorted` (increasing, not empty) at probability p in [0, 1].
double quantile_type7(const std::vector<double>& sorted, double p);

// Mean, median, 10 % and 90 % quantiles of `values` (not empty; taken by value, sorted here).
EnsembleSummary summarize(std::vector<double> values);

}  // namespace tessera
