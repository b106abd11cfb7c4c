#include "study/wilson_interval.hpp"

#include <algorithm>
#include <cmath>

namespace tessera {

WilsonInterval wilson_interval(long successes, long trials, double z) {
    const double n = static_cast<double>(trials);
    const double p = static_cast<double>(successes) / n;
    const double z2 = z * z;
    const double centre = p + z2 / (2 * n);
    const double half = z * std::sqrt(p * (1 - p) / n + z2 / (4 * n * n));
    const double scale = 1 + z2 / n;
    WilsonInterval w;
    // At k = 0 (k = n) the lower (upper) end is exactly 0 (1); say so rather than leave a
    // rounding residue of 1e-17.
    w.low = successes == 0 ? 0.0 : std::max(0.0, (centre - half) / scale);
    w.high = successes == trials ? 1.0 : std::min(1.0, (centre + half) / scale);
    return w;
}

}  // namespace tessera
