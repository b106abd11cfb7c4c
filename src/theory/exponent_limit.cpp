// The event loop of the exponent limit (exponent_limit.hpp lists the steps): phases of
// constant residents and conditions, each settled, classified and then moved exactly from
// event to event.
#include "theory/exponent_limit.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <limits>
#include <numeric>

#include "theory/limit_fitness.hpp"
#include "theory/limit_model.hpp"
#include "theory/limit_motion.hpp"
#include "theory/limit_settle.hpp"
#include "theory/limit_sources.hpp"

namespace tessera {

namespace {

std::string number_text(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

std::string trait_text(const TraitGrid& g, int i) {
    return "(" + number_text(g.dormancy(i)) + ", " + number_text(g.transfer(i)) + ")";
}

// One phase's structure: residents, equilibrium, classes and their motion.
struct Structure {
    std::vector<char> resident;      // per compartment
    std::vector<double> equilibrium; // per compartment, units of K
    FitnessClasses classes;
    MotionSystem motion;
    // Below exponent 1 with frequency-dependent transfer (no resident): the class of the
    // dominant compartments (the last one), their mix and its largest share; -1 otherwise.
    int group = -1;
    std::vector<double> ray;
    double ray_max = 1.0;
};

class LimitRun {
public:
    LimitRun(const Scenario& scenario, const LimitSettings& settings)
        : model_(scenario),
          s_(settings),
          T_(model_.traits()),
          until_(until_logK(scenario)),
          dominant_transfer_(model_.rates().transfer > 0 && model_.rates().transfer_form == TransferForm::frequency &&
                             model_.grid().y_levels() > 1) {}

    LimitPrediction run();

private:
    void build_classes(Structure& st, const DeterministicOde& ode, std::vector<double>& comp, std::vector<double>& beta);
    bool build_group(Structure& st, const DeterministicOde& below, std::vector<double>& comp, std::vector<double>& beta,
                     double s, LimitPhase& phase);

    std::vector<double> trait_exponents(const std::vector<double>& comp) const {
        std::vector<double> e(static_cast<std::size_t>(T_));
        for (int i = 0; i < T_; ++i) e[static_cast<std::size_t>(i)] = std::max(comp[static_cast<std::size_t>(i)], comp[static_cast<std::size_t>(T_ + i)]);
        return e;
    }
    // Compartment exponents from the classes' (residents at 1).
    std::vector<double> compartments_of(const Structure& st, const std::vector<double>& beta) const {
        std::vector<double> comp(static_cast<std::size_t>(2 * T_), 1.0);
        for (std::size_t c = 0; c < comp.size(); ++c) {
            if (!st.resident[c]) comp[c] = beta[static_cast<std::size_t>(st.classes.class_of[c])];
        }
        return comp;
    }
    void knot(double s, const std::vector<double>& comp) {
        std::vector<double> e = trait_exponents(comp);
        if (!out_.knot_t_logK.empty() && out_.knot_t_logK.back() == s && out_.knot_exponents.back() == e) return;
        out_.knot_t_logK.push_back(s);
        out_.knot_exponents.push_back(std::move(e));
    }
    void stop(LimitPhase& phase, PhaseEnd end, double s, std::string reason) {
        phase.end = end;
        phase.end_t_logK = s;
        out_.phases.push_back(phase);
        out_.stopped_at = s;
        out_.stop_reason = std::move(reason);
    }
    std::string traits_text(const std::vector<int>& traits) const {
        std::string t;
        for (std::size_t k = 0; k < traits.size(); ++k) t += (k ? (k + 1 == traits.size() ? " and " : ", ") : "") + trait_text(model_.grid(), traits[k]);
        return t;
    }
    std::vector<int> traits_of(const Structure& st, const std::vector<int>& classes) const {
        std::vector<int> t;
        for (int u : classes)
            for (int c : st.classes.members[static_cast<std::size_t>(u)]) t.push_back(c % T_);
        std::sort(t.begin(), t.end());
        t.erase(std::unique(t.begin(), t.end()), t.end());
        return t;
    }

    LimitModel model_;
    const LimitSettings& s_;
    int T_;
    double until_;
    // Frequency-dependent transfer acts at order one among the dominant traits even below
    // exponent 1 (tau A_j A_k / N with N ~ K^beta*): with no resident they form a group.
    bool dominant_transfer_;
    LimitPrediction out_;
};

// Residents at their equilibrium (or none, without frequency-dependent transfer): classes,
// their growth and floors from the linearisation at st.equilibrium.
void LimitRun::build_classes(Structure& st, const DeterministicOde& ode, std::vector<double>& comp,
                             std::vector<double>& beta) {
    const Eigen::MatrixXd J = non_resident_jacobian(ode, st.equilibrium, st.resident, s_.jacobian_step);
    st.classes = fitness_classes(J, st.resident, s_.coupling_threshold);
    st.group = -1;
    st.motion.growth = st.classes.growth;
    st.motion.sources = floor_sources(model_, st.classes, st.resident);
    st.motion.contact = s_.contact_tolerance;
    beta.assign(st.classes.members.size(), 0.0);
    for (std::size_t u = 0; u < beta.size(); ++u)
        for (int c : st.classes.members[u]) beta[u] = std::max(beta[u], comp[static_cast<std::size_t>(c)]);
    raise_to_floors(st.motion, beta);
    comp = compartments_of(st, beta);
}

// No resident, frequency-dependent transfer: the compartments at the highest exponent settle
// to a stable mix of the competition-free limit and grow along it; every other class is
// linearised around that mix (its transfer partners are the group's members in their shares).
bool LimitRun::build_group(Structure& st, const DeterministicOde& below, std::vector<double>& comp,
                           std::vector<double>& beta, double s, LimitPhase& phase) {
    const std::size_t C = comp.size();
    st.resident.assign(C, 0);
    double top = 0.0;
    for (double b : comp) top = std::max(top, b);
    if (!(top > s_.contact_tolerance)) {  // everything extinct: nothing to mix
        st.equilibrium.assign(C, 0.0);
        build_classes(st, below, comp, beta);
        return true;
    }
    std::vector<double> start(C, 0.0);
    for (std::size_t c = 0; c < C; ++c)
        if (comp[c] >= top - s_.contact_tolerance) start[c] = 1.0;
    const RayResult ray = settle_ray(below, start, s_);
    if (!ray.converged) {
        stop(phase, PhaseEnd::no_equilibrium, s,
             "at t/lnK = " + number_text(s) + " the traits at the top exponent (no resident) reach no stable mix within " +
                 number_text(s_.settle_time_max) + " units of plain time");
        return false;
    }
    std::vector<char> in_group(C, 0);
    std::vector<int> members;
    st.ray_max = 0.0;
    for (std::size_t c = 0; c < C; ++c) {
        in_group[c] = ray.direction[c] > 0;
        if (in_group[c]) {
            members.push_back(static_cast<int>(c));
            st.ray_max = std::max(st.ray_max, ray.direction[c]);
        }
    }
    const Eigen::MatrixXd J = non_resident_jacobian(below, ray.direction, in_group, s_.jacobian_step);
    st.classes = fitness_classes(J, in_group, s_.coupling_threshold);
    st.group = static_cast<int>(st.classes.members.size());
    for (int c : members) st.classes.class_of[static_cast<std::size_t>(c)] = st.group;
    st.classes.members.push_back(members);
    st.classes.growth.push_back(ray.growth);
    st.ray = ray.direction;
    st.equilibrium.assign(C, 0.0);
    st.motion.growth = st.classes.growth;
    st.motion.sources = floor_sources(model_, st.classes, st.resident);
    st.motion.contact = s_.contact_tolerance;
    beta.assign(st.classes.members.size(), 0.0);
    for (std::size_t u = 0; u < beta.size(); ++u)
        for (int c : st.classes.members[u]) beta[u] = std::max(beta[u], comp[static_cast<std::size_t>(c)]);
    beta[static_cast<std::size_t>(st.group)] = top;
    raise_to_floors(st.motion, beta);
    comp = compartments_of(st, beta);
    return true;
}

LimitPrediction LimitRun::run() {
    const double log_K = model_.log_K();
    const double K = model_.scenario().K;
    const std::vector<double> counts = initial_counts(model_);
    const double capacity0 = model_.conditions_between(0.0, model_.next_change_after(0.0)).capacity;
    std::vector<double> comp(static_cast<std::size_t>(2 * T_), 0.0), start(comp.size(), 0.0);
    for (std::size_t c = 0; c < comp.size(); ++c) {
        const bool at_one = counts[c] > 0 && counts[c] >= s_.resident_fraction * K * capacity0;
        comp[c] = at_one ? 1.0 : std::min(1.0, std::log1p(counts[c]) / log_K);
        if (at_one) start[c] = counts[c] / K;
    }
    knot(0.0, comp);
    double s = 0.0;
    std::size_t events = 0;
    for (;;) {
        const double change = model_.next_change_after(s);
        const double bound = std::min(until_, change);
        const PatchConditions conditions = model_.conditions_between(s, bound);
        const DeterministicOde ode = model_.ode(conditions);
        LimitPhase phase;
        phase.start_t_logK = s;
        const SettleResult settled = settle(ode, start, s_);
        if (!settled.converged) {
            stop(phase, PhaseEnd::no_equilibrium, s,
                 "at t/lnK = " + number_text(s) + " the deterministic limit reaches no equilibrium" +
                     (settled.unbounded      ? " (a density grows past " + number_text(s_.density_max) + " K)"
                      : settled.out_of_steps ? " within " + std::to_string(s_.settle_steps_max) +
                                                   " integration steps (plain time " + number_text(settled.time) +
                                                   "; densities still change at rate " + number_text(settled.residual) +
                                                   " per unit time)"
                                             : " within " + number_text(s_.settle_time_max) +
                                              " units of plain time (densities still change at rate " +
                                              number_text(settled.residual) + " per unit time)"));
            return out_;
        }
        Structure st;
        st.equilibrium = settled.densities;
        st.resident.assign(comp.size(), 0);
        bool any_resident = false;
        for (std::size_t c = 0; c < comp.size(); ++c) {
            st.resident[c] = settled.densities[c] > 0;
            if (st.resident[c]) comp[c] = 1.0;
            any_resident = any_resident || st.resident[c];
        }
        const DeterministicOde below = model_.ode_below_one(conditions);
        std::vector<double> beta;
        if (!any_resident && dominant_transfer_) {
            if (!build_group(st, below, comp, beta, s, phase)) return out_;
        } else {
            build_classes(st, ode, comp, beta);
        }
        knot(s, comp);

        phase.fitness.assign(static_cast<std::size_t>(T_), std::nan(""));
        for (int i = 0; i < T_; ++i) {
            const auto a = static_cast<std::size_t>(i), z = static_cast<std::size_t>(T_ + i);
            if (st.resident[a] || st.resident[z]) {
                phase.residents.push_back({i, st.equilibrium[a], st.equilibrium[z]});
                continue;
            }
            phase.fitness[a] = std::max(st.classes.growth[static_cast<std::size_t>(st.classes.class_of[a])],
                                        st.classes.growth[static_cast<std::size_t>(st.classes.class_of[z])]);
        }
        // Traits left at 1 (old residents, failed invaders) must decline, or the equilibrium
        // does not describe the phase.
        std::vector<double> v = velocities(st.motion, beta);
        for (std::size_t u = 0; u < beta.size(); ++u) {
            if (beta[u] < 1.0 - s_.contact_tolerance || v[u] < -s_.neutral_fitness) continue;
            const std::string who = traits_text(traits_of(st, {static_cast<int>(u)}));
            if (v[u] > s_.neutral_fitness) {
                const bool empty = phase.residents.empty() && model_.rates().transfer > 0 &&
                                   model_.rates().transfer_form == TransferForm::frequency;
                stop(phase, PhaseEnd::no_equilibrium, s,
                     "at t/lnK = " + number_text(s) + " " + who + " is at exponent 1 but not resident and grows (fitness " +
                         number_text(v[u]) + "): the equilibrium reached is not stable against it" +
                         (empty ? " (the deterministic limit collapsed to no resident; below exponent 1 the frequency-"
                                  "dependent transfer among the survivors decides, which the limit does not follow)"
                                : ""));
            } else {
                stop(phase, PhaseEnd::tie, s,
                     "at t/lnK = " + number_text(s) + " " + who +
                         " is at exponent 1 with invasion fitness 0 (neutral): the limit does not say whether it stays");
            }
            return out_;
        }

        for (;;) {
            v = velocities(st.motion, beta);
            const MotionEvent ev = next_motion_event(st.motion, beta, v);
            if (++events > s_.max_events) {
                stop(phase, PhaseEnd::no_equilibrium, s,
                     "at t/lnK = " + number_text(s) + " more than " + std::to_string(s_.max_events) +
                         " events: the prediction stops there");
                return out_;
            }
            // Below exponent 1 a class meeting the dominant group's exponent joins its mix.
            if (st.group >= 0) {
                const auto g = static_cast<std::size_t>(st.group);
                double join = std::numeric_limits<double>::infinity();
                for (std::size_t u = 0; u < beta.size(); ++u) {
                    const double gap = beta[g] - beta[u];
                    if (u != g && gap > s_.contact_tolerance && v[u] > v[g]) join = std::min(join, gap / (v[u] - v[g]));
                }
                if (join < ev.dt && s + join < bound) {
                    for (std::size_t u = 0; u < beta.size(); ++u) beta[u] = std::clamp(beta[u] + v[u] * join, 0.0, 1.0);
                    s += join;
                    comp = compartments_of(st, beta);
                    knot(s, comp);
                    if (!build_group(st, below, comp, beta, s, phase)) return out_;
                    knot(s, comp);
                    continue;
                }
            }
            // An event within tie_tolerance of run.until is at run.until (no phase of zero length).
            const bool at_end = bound >= until_ && s + ev.dt > until_ - s_.tie_tolerance;
            if (ev.kind == MotionEvent::none || s + ev.dt >= bound || at_end) {
                for (std::size_t u = 0; u < beta.size(); ++u) beta[u] = std::clamp(beta[u] + v[u] * (bound - s), 0.0, 1.0);
                s = bound;
                comp = compartments_of(st, beta);
                knot(s, comp);
                if (bound >= until_) {
                    const bool none_grows = std::none_of(v.begin(), v.end(), [](double x) { return x > 0; });
                    phase.end = phase.residents.empty() && none_grows ? PhaseEnd::no_resident : PhaseEnd::until;
                    phase.end_t_logK = s;
                    out_.phases.push_back(phase);
                    out_.stopped_at = s;
                    return out_;
                }
                phase.end = PhaseEnd::schedule;
                phase.end_t_logK = s;
                out_.phases.push_back(phase);
                start = st.equilibrium;
                break;
            }
            for (std::size_t u = 0; u < beta.size(); ++u) beta[u] = std::clamp(beta[u] + v[u] * ev.dt, 0.0, 1.0);
            s += ev.dt;
            if (ev.kind == MotionEvent::reach_one) beta[static_cast<std::size_t>(ev.unit)] = 1.0;
            if (ev.kind == MotionEvent::reach_zero) beta[static_cast<std::size_t>(ev.unit)] = 0.0;
            knot(s, compartments_of(st, beta));
            raise_to_floors(st.motion, beta);
            comp = compartments_of(st, beta);
            knot(s, comp);

            // Who reaches 1 now: the class of the event, the classes it carries with it at order
            // one, and any other within tie_tolerance (a tie when not carried by one another).
            // Any event may bring a class within contact of 1, not only its own.
            std::vector<int> rising;
            for (std::size_t u = 0; u < beta.size(); ++u) {
                if (v[u] > 0 && (beta[u] >= 1.0 - s_.contact_tolerance || 1.0 - beta[u] <= v[u] * s_.tie_tolerance))
                    rising.push_back(static_cast<int>(u));
            }
            if (rising.empty()) continue;

            std::vector<int> group(rising.size());
            std::iota(group.begin(), group.end(), 0);
            std::function<int(int)> root = [&](int k) { return group[static_cast<std::size_t>(k)] == k ? k : group[static_cast<std::size_t>(k)] = root(group[static_cast<std::size_t>(k)]); };
            for (std::size_t a = 0; a < rising.size(); ++a)
                for (std::size_t b = 0; b < rising.size(); ++b)
                    if (a != b && follows(st.motion, beta, rising[a], rising[b]))
                        group[static_cast<std::size_t>(root(static_cast<int>(a)))] = root(static_cast<int>(b));
            std::vector<int> leaders;
            for (std::size_t a = 0; a < rising.size(); ++a)
                if (root(static_cast<int>(a)) == static_cast<int>(a)) leaders.push_back(rising[a]);
            phase.invaders = traits_of(st, rising);
            if (leaders.size() > 1) {
                std::vector<int> first;
                for (int u : leaders) first.push_back(traits_of(st, {u}).front());
                stop(phase, PhaseEnd::tie, s,
                     "at t/lnK = " + number_text(s) + " " + traits_text(first) + " reach exponent 1 within " +
                         number_text(s_.tie_tolerance) + " of each other: the limit does not say which invades first");
                return out_;
            }
            for (int u : rising) beta[static_cast<std::size_t>(u)] = 1.0;
            comp = compartments_of(st, beta);
            phase.end = PhaseEnd::invasion;
            phase.end_t_logK = s;
            out_.phases.push_back(phase);
            start = st.equilibrium;
            for (int u : rising) {
                for (int c : st.classes.members[static_cast<std::size_t>(u)]) {
                    // The dominant group arrives in its own mix.
                    const double share = u == st.group ? st.ray[static_cast<std::size_t>(c)] / st.ray_max : 1.0;
                    start[static_cast<std::size_t>(c)] = s_.invader_density * share;
                }
            }
            break;
        }
    }
}

}  // namespace

LimitPrediction predict_limit(const Scenario& scenario, const LimitSettings& settings) {
    return LimitRun(scenario, settings).run();
}

}  // namespace tessera
