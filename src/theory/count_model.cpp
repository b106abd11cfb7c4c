#include "theory/count_model.hpp"

#include <boost/numeric/odeint.hpp>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include "core/deterministic_ode.hpp"
#include "core/engine.hpp"  // series_output, fields_output
#include "core/inoculum_cells.hpp"
#include "core/habitat_timeline.hpp"
#include "core/rate_table.hpp"

namespace tessera {

namespace {

// Times that differ only by rounding are the same output time (as in core/engine.cpp).
bool reached(double t, double target) { return t >= target - 1e-12 * std::max(1.0, std::fabs(target)); }

std::string time_text(double t) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", t);
    return buf;
}

}  // namespace

CountModel::CountModel(const Scenario& scenario, CountModelSettings settings)
    : scenario_(scenario), grid_(scenario.dormancy_axis, scenario.transfer_axis), settings_(settings) {}

void CountModel::run(const std::function<void(const CountState&)>& observe) const {
    using State = std::vector<double>;
    namespace odeint = boost::numeric::odeint;

    // The scenario completed as a run completes it (core/engine.cpp: default habitat, map).
    Scenario s = scenario_;
    if (s.habitats.empty()) s.habitats.push_back(Habitat{});
    const std::size_t P = static_cast<std::size_t>(s.width) * s.height;
    if (s.habitat_of_patch.size() != P) s.habitat_of_patch.assign(P, 0);
    const RateTable rates(grid_, s.rates, s.K);
    const HabitatTimeline timeline(s);
    const int T = grid_.size();
    const auto patch_conditions = [&](double t) {
        const std::vector<PatchConditions> classes = timeline.at(t);
        std::vector<PatchConditions> where(P);
        for (std::size_t p = 0; p < P; ++p) where[p] = classes[s.habitat_of_patch[p]];
        return where;
    };
    DeterministicOde ode(s, grid_, rates, patch_conditions(0.0), MutationTerm::source);
    // The run's inoculum, rounded to whole cells as a run rounds it (in real numbers, so that
    // any K works).
    State y(ode.size(), 0.0);
    for_each_inoculum_cell(s, grid_, timeline.at(0.0), [&](std::size_t p, int i, double active, double dormant) {
        y[ode.active_index(p, i)] += std::round(active) / s.K;
        y[ode.dormant_index(p, i)] += std::round(dormant) / s.K;
    });
    evaluations_ = 0;
    const auto system = [&](const State& x, State& dxdt, double t) {
        ++evaluations_;
        ode(x, dxdt, t);
    };
    auto stepper = odeint::make_dense_output(settings_.absolute_cells / s.K, settings_.relative_tolerance,
                                             odeint::runge_kutta_dopri5<State>());

    CountState out;
    out.active.resize(P * static_cast<std::size_t>(T));
    out.dormant.resize(out.active.size());
    double t = 0.0;
    const auto emit = [&](unsigned kinds) {
        out.t = t;
        out.t_logK = t / std::log(s.K);
        out.kinds = kinds;
        for (std::size_t p = 0; p < P; ++p) {
            for (int i = 0; i < T; ++i) {
                out.active[p * T + i] = std::max(0.0, y[ode.active_index(p, i)] * s.K);
                out.dormant[p * T + i] = std::max(0.0, y[ode.dormant_index(p, i)] * s.K);
            }
        }
        observe(out);
    };

    // Pieces of constant conditions: [t, piece_end), integrated by one dense-output stepper.
    bool in_piece = false;
    double piece_end = 0.0, step = settings_.first_step;
    const auto advance_to = [&](double target) {
        while (!reached(t, target)) {
            if (!in_piece) {
                ode.set_conditions(patch_conditions(t));
                piece_end = timeline.next_change_after(t);
                stepper.initialize(y, t, step);
                in_piece = true;
            }
            const double to = reached(piece_end, target) ? target : std::min(target, piece_end);
            while (stepper.current_time() < to) {
                stepper.do_step(system);
                step = stepper.current_time_step();
                const State& now = stepper.current_state();
                if (!std::all_of(now.begin(), now.end(), [](double v) { return std::isfinite(v); })) {
                    throw std::runtime_error("the deterministic model's counts became non-finite at t = " +
                                             time_text(stepper.current_time()));
                }
                if (step < settings_.smallest_relative_step * std::max(1.0, std::fabs(stepper.current_time()))) {
                    throw std::runtime_error("the integrator's step collapsed at t = " +
                                             time_text(stepper.current_time()) + " (the model is too stiff there)");
                }
            }
            stepper.calc_state(to, y);
            t = to;
            if (reached(t, piece_end)) in_piece = false;  // a schedule switches here
        }
    };

    // Output times as a run has them (core/engine.cpp Engine::run): every output.every and
    // output.fields_every, and the end.
    const double end = s.to_plain(s.until);
    const double every[2] = {s.to_plain(s.output_every), s.to_plain(s.fields_every)};
    const unsigned kind_of[2] = {series_output, fields_output};
    std::uint64_t next[2] = {0, 0};
    for (;;) {
        unsigned due = 0;
        for (int k = 0; k < 2; ++k) {
            if (every[k] > 0 && reached(t, static_cast<double>(next[k]) * every[k])) {
                due |= kind_of[k];
                ++next[k];
            }
        }
        const bool finished = reached(t, end);
        if (finished) due |= series_output | (every[1] > 0 ? unsigned{fields_output} : 0u);
        if (due) emit(due);
        if (finished) return;
        double target = end;
        for (int k = 0; k < 2; ++k) {
            if (every[k] > 0) target = std::min(target, static_cast<double>(next[k]) * every[k]);
        }
        advance_to(target);
    }
}

}  // namespace tessera
