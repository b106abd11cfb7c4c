// V7 (validation.md): the speed of an invasion front on a 1-row lattice.
//
// Source: the linear spreading speed of a pulled front (W. van Saarloos 2003, "Front
// propagation into unstable states", Phys. Rep. 386:29-222, section 2): for the lattice
// Fisher-KPP equation dn_i/dt = r n_i (1 - n_i/n*) + h (n_{i+1} + n_{i-1} - 2 n_i), a
// perturbation e^{-l (i - v t)} grows at rate r + 2h (cosh l - 1), so
//     v* = min over l > 0 of (r + 2h (cosh l - 1)) / l     (patches per unit time),
// reached at l = g*. With finitely many cells the front is slower, by about the cut-off
// correction of E. Brunet & B. Derrida (1997), "Shift in the velocity of a front due to a
// cutoff", Phys. Rev. E 56:2597-2604:
//     v* - v_N ~ pi^2 g*^2 v''(g*) / (2 ln^2 N) = pi^2 g* h cosh(g*) / ln^2 N
// (formula quoted from memory; the second form uses v''(g*) = w''(g*)/g* with
// w(l) = r + 2h (cosh l - 1), which holds at the minimum of w(l)/l). N is the number of
// cells in a saturated patch, here n* = K (b - d) / C = K. The next correction (of order
// ln ln N / ln^3 N, also from memory) makes the shift smaller than this at moderate N.
//
// What h is: with the 4-neighbourhood a cell jumps at rate m to each of 4 directions with
// probability 1/4; on a 1-row lattice with reflecting edges the jumps up and down are
// cancelled, so a cell moves left at rate m/4 and right at rate m/4: h = m / 4.
//
// System: b = 2, d = 1, C = 1 (r = 1), m = 4 (h = 1), one trait, no mutation; the left 5
// patches start at K; method "auto" (the leap engine in saturated patches, exact events at
// the tip) with sync = 0.01. The front position is where the count crosses K/2 (linear
// interpolation between patches); its speed is the least-squares slope of position on
// time once the front has relaxed, averaged over replicates.
//
// Tolerance: the measured speed must lie between v* - 2 D and v* - 0.2 D, where D is the
// Brunet-Derrida shift above (D / v* is 7% at K = 1e4 and 3% at K = 1e6): the formula is
// asymptotic, its next term is large at these N, and the split step and the leap add
// errors of order 1%, so only the sign and the size of the shift are claimed, at two K
// (D shrinks as 1 / ln^2 K, and so does the band). A factor 2 in h
// moves v* by about 40% (2.07 -> 2.88 at h = 2; 1.5 at h = 1/2): far outside. The front's
// own wandering makes single-replicate speeds scatter (measured standard deviation about
// 0.04 at K = 1e4 and 0.008 at K = 1e6 over the fitted stretch of 20 time units), so the
// speed is averaged over 8 replicates at K = 1e4 and 4 at K = 1e6: every bound is then
// at least 5 standard deviations away from the measured means (1.90-1.94 and 1.97-1.99
// over 7 seeds, shifts of about 1.1 D and 1.4 D; the larger one at K = 1e6 includes the
// slower relaxation of the front there). That the speed at K = 1e6 exceeds the one at
// K = 1e4 held at every seed tried, but by only about 4 standard deviations of the
// difference, so it is not asserted.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "spatial_support.hpp"

using namespace tessera;
using namespace tessera::spatial;

namespace {

constexpr double r = 1.0;  // b - d
constexpr double m = 4.0;
constexpr double h = m / 4;

// v(l) = (r + 2h (cosh l - 1)) / l is convex on l > 0; golden-section search for its minimum.
double speed_at(double l) { return (r + 2 * h * (std::cosh(l) - 1)) / l; }
double slowest_decay() {
    double lo = 0.01, hi = 5.0;
    const double g = (std::sqrt(5.0) - 1) / 2;
    for (int i = 0; i < 200; ++i) {
        const double a = hi - g * (hi - lo), b = lo + g * (hi - lo);
        if (speed_at(a) < speed_at(b)) {
            hi = b;
        } else {
            lo = a;
        }
    }
    return (lo + hi) / 2;
}

// Position of the K/2 crossing: the last patch at or above K/2, plus the linear fraction
// of the way to the next one.
double front_position(const Engine& e, double K) {
    const int W = e.lattice().width();
    int last = -1;
    for (int i = 0; i < W; ++i) {
        if (static_cast<double>(active_in(e, static_cast<std::size_t>(i))) >= K / 2) last = i;
    }
    if (last < 0 || last + 1 >= W) return static_cast<double>(last);
    const double here = static_cast<double>(active_in(e, static_cast<std::size_t>(last)));
    const double next = static_cast<double>(active_in(e, static_cast<std::size_t>(last + 1)));
    return last + (here - K / 2) / (here - next);
}

// The least-squares slope of the front position on time over [from, to], one replicate.
double measured_speed(double K, double from, double to, int width, std::uint32_t replicate, std::uint64_t seed) {
    Scenario s = quiet_lattice(width, 1);
    s.K = K;
    s.rates.birth_max = 2.0;
    s.rates.death = 1.0;
    s.rates.competition = 1.0;
    s.rates.migration = m;
    Inoculum in = cells_at(0, 0, K);
    in.where = Inoculum::Where::rect;
    in.x1 = 4;
    s.inocula = {in};
    s.method = Method::auto_select;
    s.sync = 0.01;
    s.seed = seed;
    Engine e(s, replicate);
    double st = 0, sx = 0, stt = 0, stx = 0, n = 0;
    for (double t = from; t <= to + 1e-9; t += 0.5) {
        e.advance_to(t);
        const double x = front_position(e, K);
        st += t;
        sx += x;
        stt += t * t;
        stx += t * x;
        n += 1;
    }
    return (n * stx - st * sx) / (n * stt - st * st);
}

double mean_speed(double K, double from, double to, int width, std::uint32_t R, std::uint64_t seed) {
    std::vector<double> v(R);
    validation::for_replicates(R, [&](std::uint32_t rep) { v[rep] = measured_speed(K, from, to, width, rep, seed); });
    double sum = 0;
    for (double x : v) sum += x;
    return sum / R;
}

}  // namespace

TEST_CASE("V7 an invasion front runs at the lattice Fisher-KPP speed less the Brunet-Derrida shift",
          "[validation][V7]") {
    const double g = slowest_decay();
    const double v_star = speed_at(g);
    REQUIRE(v_star == Approx(2.07).epsilon(0.01));  // a sanity value of the minimisation
    auto shift = [&](double K) { return M_PI * M_PI * g * h * std::cosh(g) / std::pow(std::log(K), 2); };

    const double v4 = mean_speed(1e4, 10.0, 30.0, 80, 8, validation::test_seed(701));
    const double v6 = mean_speed(1e6, 15.0, 35.0, 95, 4, validation::test_seed(702));
    INFO("v* = " << v_star << " (l* = " << g << "); K = 1e4: v = " << v4 << ", v* - shift = " << v_star - shift(1e4)
                 << "; K = 1e6: v = " << v6 << ", v* - shift = " << v_star - shift(1e6));
    CHECK(v4 >= v_star - 2 * shift(1e4));
    CHECK(v4 <= v_star - 0.2 * shift(1e4));
    CHECK(v6 >= v_star - 2 * shift(1e6));
    CHECK(v6 <= v_star - 0.2 * shift(1e6));
}
