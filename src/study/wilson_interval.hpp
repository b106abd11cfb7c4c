// The Wilson score interval of a binomial proportion (Wilson 1927, J. Amer. Statist. Assoc.
// 22:209-212): the p whose score test at level 1 - a does not reject k successes in n,
//   (p^ + z^2/2n -/+ z sqrt(p^(1 - p^)/n + z^2/4n^2)) / (1 + z^2/n),  p^ = k/n.
// Unlike the Wald interval it stays inside [0, 1] and keeps its coverage near 0 and 1
// (Agresti & Coull 1998, Amer. Statist. 52:119-126), which is where invasion and
// extinction probabilities often lie. No I/O.
#pragma once

namespace tessera {

// The standard normal quantile at 0.975, for 95 % intervals (to the double's precision).
inline constexpr double z_95 = 1.959963984540054;

struct WilsonInterval {
    double low = 0.0;
    double high = 1.0;
};

// Precondition: 0 <= successes <= trials, trials >= 1.
WilsonInterval wilson_interval(long successes, long trials, double z = z_95);

}  // namespace tessera
