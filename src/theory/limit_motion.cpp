#include "theory/limit_motion.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>

namespace tessera {

namespace {
constexpr double minus_inf = -std::numeric_limits<double>::infinity();
}

double source_value(const FloorSource& f, const std::vector<double>& beta) {
    double v = f.offset;
    if (f.class1 >= 0) v += beta[static_cast<std::size_t>(f.class1)];
    if (f.class2 >= 0) v += beta[static_cast<std::size_t>(f.class2)];
    return v;
}

std::vector<double> floors(const MotionSystem& m, const std::vector<double>& beta) {
    std::vector<double> F(beta.size(), minus_inf);
    for (std::size_t u = 0; u < beta.size(); ++u)
        for (const FloorSource& f : m.sources[u]) F[u] = std::max(F[u], source_value(f, beta));
    return F;
}

void raise_to_floors(const MotionSystem& m, std::vector<double>& beta) {
    // Floors between classes form no cycle of offset 0 (order-one edges join distinct
    // strongly connected components; mutation and products subtract), so this ends within
    // one pass per class.
    for (std::size_t pass = 0; pass <= beta.size(); ++pass) {
        bool moved = false;
        for (std::size_t u = 0; u < beta.size(); ++u) {
            for (const FloorSource& f : m.sources[u]) {
                const double value = std::min(1.0, source_value(f, beta));
                if (value > beta[u] + m.contact) {
                    beta[u] = value;
                    moved = true;
                }
            }
        }
        if (!moved) return;
    }
}

std::vector<double> velocities(const MotionSystem& m, const std::vector<double>& beta) {
    const std::size_t n = beta.size();
    const std::vector<double> F = floors(m, beta);
    std::vector<double> v(n, 0.0);
    std::vector<char> state(n, 0);  // 0 to do, 1 in progress, 2 done
    std::function<double(int)> slope = [&](int u) -> double {
        if (u < 0) return 0.0;
        const auto uu = static_cast<std::size_t>(u);
        if (state[uu] == 2) return v[uu];
        if (state[uu] == 1) return minus_inf;  // no binding cycle exists; never taken
        state[uu] = 1;
        const bool at_zero = beta[uu] <= m.contact;
        double result;
        if (beta[uu] > F[uu] + m.contact) {
            result = at_zero ? 0.0 : m.growth[uu];  // free; at 0 with every source below: extinct
        } else {
            double vf = minus_inf;
            for (const FloorSource& f : m.sources[uu]) {
                if (source_value(f, beta) >= F[uu] - m.contact) vf = std::max(vf, slope(f.class1) + slope(f.class2));
            }
            result = (at_zero && !(vf > 0)) ? 0.0 : std::max(m.growth[uu], vf);
        }
        v[uu] = result;
        state[uu] = 2;
        return result;
    };
    for (std::size_t u = 0; u < n; ++u) slope(static_cast<int>(u));
    return v;
}

bool follows(const MotionSystem& m, const std::vector<double>& beta, int u, int w) {
    const auto uu = static_cast<std::size_t>(u);
    double F = minus_inf;
    for (const FloorSource& f : m.sources[uu]) F = std::max(F, source_value(f, beta));
    if (beta[uu] > F + m.contact) return false;
    for (const FloorSource& f : m.sources[uu]) {
        if (source_value(f, beta) >= F - m.contact && (f.class1 == w || f.class2 == w)) return true;
    }
    return false;
}

MotionEvent next_motion_event(const MotionSystem& m, const std::vector<double>& beta, const std::vector<double>& v) {
    MotionEvent best;
    best.dt = std::numeric_limits<double>::infinity();
    auto consider = [&](MotionEvent::Kind kind, double dt, std::size_t u) {
        if (dt < best.dt) best = {kind, dt, static_cast<int>(u)};
    };
    for (std::size_t u = 0; u < beta.size(); ++u) {
        if (v[u] > 0 && beta[u] < 1.0 - m.contact) consider(MotionEvent::reach_one, (1.0 - beta[u]) / v[u], u);
        if (v[u] < 0 && beta[u] > m.contact) consider(MotionEvent::reach_zero, beta[u] / -v[u], u);
        for (const FloorSource& f : m.sources[u]) {
            const double gap = beta[u] - source_value(f, beta);
            const double vf = (f.class1 >= 0 ? v[static_cast<std::size_t>(f.class1)] : 0.0) +
                              (f.class2 >= 0 ? v[static_cast<std::size_t>(f.class2)] : 0.0);
            if (gap > m.contact && vf > v[u]) consider(MotionEvent::meet_floor, gap / (vf - v[u]), u);
        }
    }
    return best;
}

}  // namespace tessera
