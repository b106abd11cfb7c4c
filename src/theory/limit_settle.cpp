#include "theory/limit_settle.hpp"

#include <Eigen/Dense>
#include <boost/numeric/odeint.hpp>

#include <algorithm>
#include <cmath>
#include <functional>

namespace tessera {

double settle_residual(const DeterministicOde& ode, const std::vector<double>& y, double floor) {
    std::vector<double> dydt(y.size());
    ode(y, dydt, 0.0);
    double worst = 0.0;
    for (std::size_t c = 0; c < y.size(); ++c) {
        if (y[c] > floor) worst = std::max(worst, std::fabs(dydt[c]));
    }
    return worst;
}

namespace {

using State = std::vector<double>;

// Largest |dy_c/dt| / y_c over compartments above `floor`.
double relative_residual(const DeterministicOde& ode, const State& y, double floor) {
    State dydt(y.size());
    ode(y, dydt, 0.0);
    double worst = 0.0;
    for (std::size_t c = 0; c < y.size(); ++c) {
        if (y[c] > floor) worst = std::max(worst, std::fabs(dydt[c]) / y[c]);
    }
    return worst;
}

// Integrates in chunks of growing length until `done(y)` or out of time; negative rounding
// below zero is cut off after each chunk.
template <class Done>
bool integrate_until(const DeterministicOde& ode, State& y, double& time, std::size_t& steps, const LimitSettings& s,
                     Done done) {
    namespace odeint = boost::numeric::odeint;
    auto stepper = odeint::make_controlled<odeint::runge_kutta_dopri5<State>>(s.integration_abs_tolerance,
                                                                              s.integration_rel_tolerance);
    // An intermediate stage may overshoot below 0, where the model means nothing (tau / n
    // blows up as n passes 0): DeterministicOde takes its rates at the densities clipped at
    // 0 (one patch: no migration term reads them unclipped), so it is integrated as it is.
    const auto system = std::cref(ode);
    double chunk = 1.0;
    for (;;) {
        if (done(y)) return true;
        if (time >= s.settle_time_max) return false;
        if (*std::max_element(y.begin(), y.end()) > s.density_max || steps > s.settle_steps_max) return false;
        const double span = std::min(chunk, s.settle_time_max - time);
        steps += odeint::integrate_adaptive(stepper, system, y, time, time + span, std::min(0.1, span));
        time += span;
        for (double& v : y) {
            if (!std::isfinite(v)) return false;
            v = std::max(v, 0.0);
        }
        chunk = std::min(2.0 * chunk, 1000.0);
    }
}

// Newton's method on the compartments that are positive (the others stay 0); true when it
// reaches settle_tolerance with every one of them still positive.
bool polish(const DeterministicOde& ode, State& y, const LimitSettings& s) {
    std::vector<std::size_t> live;
    for (std::size_t c = 0; c < y.size(); ++c)
        if (y[c] > 0) live.push_back(c);
    const auto m = static_cast<Eigen::Index>(live.size());
    if (m == 0) return true;
    State x = y, f(y.size()), fp(y.size()), fm(y.size());
    for (int iteration = 0; iteration < 30; ++iteration) {
        ode(x, f, 0.0);
        double worst = 0.0;
        for (std::size_t c : live) worst = std::max(worst, std::fabs(f[c]));
        if (worst < s.settle_tolerance) {
            y = x;
            return true;
        }
        Eigen::MatrixXd J(m, m);
        Eigen::VectorXd rhs(m);
        for (Eigen::Index j = 0; j < m; ++j) {
            const std::size_t cj = live[static_cast<std::size_t>(j)];
            const double h = 1e-7 * std::max(1.0, x[cj]);  // central differences: error O(h^2)
            const double keep = x[cj];
            x[cj] = keep + h;
            ode(x, fp, 0.0);
            x[cj] = keep - h;
            ode(x, fm, 0.0);
            x[cj] = keep;
            for (Eigen::Index i = 0; i < m; ++i) {
                const std::size_t ci = live[static_cast<std::size_t>(i)];
                J(i, j) = (fp[ci] - fm[ci]) / (2 * h);
            }
            rhs(j) = -f[cj];
        }
        const Eigen::VectorXd dx = J.fullPivLu().solve(rhs);
        if (!dx.allFinite()) return false;
        for (Eigen::Index i = 0; i < m; ++i) {
            const std::size_t c = live[static_cast<std::size_t>(i)];
            x[c] += dx(i);
            if (!(x[c] > 0)) return false;  // left the equilibrium the integration was near
        }
    }
    return false;
}

}  // namespace

SettleResult settle(const DeterministicOde& ode, std::vector<double> start, const LimitSettings& settings) {
    SettleResult r;
    r.densities = std::move(start);
    for (double& v : r.densities) v = std::max(v, 0.0);
    const double floor = settings.extinct_density;
    auto zero_extinct = [&] {
        for (double& v : r.densities)
            if (v <= floor) v = 0.0;
    };
    for (double target = settings.polish_from; target >= 1e-12; target *= 1e-2) {
        r.converged = integrate_until(ode, r.densities, r.time, r.steps, settings,
                                      [&](const State& y) { return relative_residual(ode, y, floor) < target; });
        if (!r.converged) break;
        zero_extinct();
        State polished = r.densities;
        if (polish(ode, polished, settings)) {
            r.densities = polished;
            zero_extinct();
            r.residual = settle_residual(ode, r.densities, floor);
            r.converged = r.residual < settings.settle_tolerance;
            if (r.converged) return r;
        }
        // Newton did not hold: integrate closer and try again.
    }
    r.residual = settle_residual(ode, r.densities, floor);
    r.converged = false;
    r.unbounded = *std::max_element(r.densities.begin(), r.densities.end()) > settings.density_max;
    r.out_of_steps = r.steps > settings.settle_steps_max;
    return r;
}

RayResult settle_ray(const DeterministicOde& ode, std::vector<double> start, const LimitSettings& settings) {
    namespace odeint = boost::numeric::odeint;
    RayResult r;
    State y = std::move(start), f(y.size());
    auto normalise = [&] {
        double sum = 0.0;
        for (double& v : y) sum += v = std::max(v, 0.0);
        if (!(sum > 0) || !std::isfinite(sum)) return false;
        for (double& v : y) {
            v /= sum;
            if (v <= settings.extinct_density) v = 0.0;
        }
        return true;
    };
    if (!normalise()) return r;
    auto stepper = odeint::make_controlled<odeint::runge_kutta_dopri5<State>>(settings.integration_abs_tolerance,
                                                                              settings.integration_rel_tolerance);
    // An intermediate stage may overshoot below 0, where the model means nothing (tau / n
    // blows up as n passes 0): DeterministicOde takes its rates at the densities clipped at
    // 0 (one patch: no migration term reads them unclipped), so it is integrated as it is.
    const auto system = std::cref(ode);
    for (;;) {
        ode(y, f, 0.0);
        double total = 0.0, sum = 0.0;
        for (std::size_t c = 0; c < y.size(); ++c) {
            total += f[c];
            sum += y[c];
        }
        r.growth = total / sum;
        double worst = 0.0;
        for (std::size_t c = 0; c < y.size(); ++c)
            if (y[c] > 0) worst = std::max(worst, std::fabs(f[c] - r.growth * y[c]) / y[c]);
        if (worst < settings.polish_from) {
            r.converged = true;
            r.direction = y;
            return r;
        }
        if (r.time >= settings.settle_time_max) return r;
        // One unit of plain time at a time, so the shares stay far from overflow whatever the
        // growth rate, and are renormalised between.
        r.steps += odeint::integrate_adaptive(stepper, system, y, 0.0, 1.0, 0.1);
        r.time += 1.0;
        if (r.steps > settings.settle_steps_max) return r;
        if (!normalise()) return r;
    }
}

}  // namespace tessera
