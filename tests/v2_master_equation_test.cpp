// V2 (validation.md): exact distributions of small systems.
//
// Source: the chemical master equation, dp/dt = p Q, of a continuous-time Markov jump
// process (N. G. van Kampen, Stochastic Processes in Physics and Chemistry, North-Holland,
// ch. V "The master equation"), solved as p(t) = p(0) exp(Q t) with Eigen's
// unsupported MatrixFunctions (scaling and squaring with Pade approximants, Higham 2005,
// SIAM J. Matrix Anal. Appl. 26:1179) on a truncated state space (the finite state
// projection of Munsky & Khammash 2006, J. Chem. Phys. 124:044104: transitions out of the
// truncation are kept as loss, so 1 - sum p(t) is exactly the probability of having left
// it, and the test asserts it is negligible). Chapter numbers and the two citations in
// parentheses are from memory.
//
// The generator Q is written here from model.md section 2 alone, independently of
// src/core: every event, its rate and its effect on the counts. The engine's end states of
// N = 50000 replicates are then compared with p(t) by Pearson's chi-squared test, bins
// with expected count below 5 pooled, of size chi_squared_alpha (1e-7, see
// validation_support.hpp for the budget). With 50000 replicates a factor 2 in any rate
// that the system uses gives chi-squared statistics in the hundreds or thousands (the
// factor-2 breaks of the report were all caught by margins of that size).
//
// Systems (all one patch, small K so that the state space stays below 1000 states):
//  (a) logistic growth with dormancy, one trait with x > 0 (q = 0.5), dormant death and
//      resuscitation; once with competition by active cells only and once counting
//      dormant cells, with habitat stress and a resuscitation factor;
//  (b) two traits (y = 0, y = max) with conjugation, frequency and density forms, and
//      transfer_copies = transfer_only on a 2 x 2 grid;
//  (c) two traits with mutation, mu = K^-alpha = 0.2, backward probability 0.3.
// Per-trait overrides of death, competition and q appear in (a) and (b), so that both the
// engine's trait-independent and trait-dependent paths are covered.
//
// A last case checks the mutation kernel on a 2 x 2 grid, where the master equation would
// need thousands of states: only the parent trait divides (the others have birth 0, and
// nothing dies), so each division is an independent draw of where the offspring lands,
// with the probabilities model.md section 2 gives (mu (1 - backward) forward, mu backward
// backward, each split 1/2 between two targets, no move where there is no target). The
// count of mutants M over B divisions has E[M] = p B exactly (optional stopping: M - p B
// is a martingale) and variance p (1 - p) E[B]; given M, the split between the two targets
// is exactly Binomial(M, 1/2). Tolerance: z_tolerance (5) standard errors.
#include <catch2/catch.hpp>

#include <Eigen/Dense>
#include <unsupported/Eigen/MatrixFunctions>

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <map>
#include <vector>

#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

namespace {

using State = std::vector<int>;  // active counts per trait, then dormant counts per trait

// The model of model.md section 2 for one patch, restated from the spec.
struct MasterModel {
    int x_levels, y_levels;
    std::vector<double> birth, death, competition, q;  // per trait
    double stress, mu, backward, tau, kappa, sigma_eff, Kp;
    bool density, transfer_only, count_dormant;

    int traits() const { return x_levels * y_levels; }
    int index(int xl, int yl) const { return xl * y_levels + yl; }

    // Built from the scenario by the rules of model.md: b = b_max - c_x x - c_y y,
    // q = p x, mu = K^-alpha, overrides replace single rates.
    MasterModel(const Scenario& s, const PatchConditions& where) {
        x_levels = s.dormancy_axis.levels;
        y_levels = s.transfer_axis.levels;
        const double dx = x_levels > 1 ? s.dormancy_axis.max / (x_levels - 1) : 0.0;
        const double dy = y_levels > 1 ? s.transfer_axis.max / (y_levels - 1) : 0.0;
        for (int xl = 0; xl < x_levels; ++xl) {
            for (int yl = 0; yl < y_levels; ++yl) {
                const double x = xl * dx, y = yl * dy;
                double b = s.rates.birth_max - s.rates.birth_cost_dormancy * x - s.rates.birth_cost_transfer * y;
                double d = s.rates.death, c = s.rates.competition, qq = s.rates.dormancy_probability * x;
                for (const RateOverride& o : s.rates.overrides) {
                    if (std::fabs(o.dormancy - x) < 1e-9 && std::fabs(o.transfer - y) < 1e-9) {
                        b = o.birth.value_or(b);
                        d = o.death.value_or(d);
                        c = o.competition.value_or(c);
                        qq = o.dormancy_probability.value_or(qq);
                    }
                }
                birth.push_back(b);
                death.push_back(d);
                competition.push_back(c);
                q.push_back(qq);
            }
        }
        stress = where.stress;
        mu = std::isinf(s.rates.mutation_exponent) ? 0.0 : std::pow(s.K, -s.rates.mutation_exponent);
        backward = s.rates.mutation_backward;
        tau = s.rates.transfer;
        kappa = s.rates.dormant_death;
        sigma_eff = s.rates.resuscitation * where.resuscitation;
        Kp = s.K * where.capacity;
        density = s.rates.transfer_form == TransferForm::density;
        transfer_only = s.rates.transfer_copies == TransferCopies::transfer_only;
        count_dormant = s.rates.competition_counts_dormant;
    }

    // Mutation targets one step forward (+1) or backward (-1): up to two, each taken with
    // probability 1/2; none at the edge of the grid.
    std::vector<int> targets(int i, int step) const {
        std::vector<int> t;
        const int xl = i / y_levels, yl = i % y_levels;
        if (xl + step >= 0 && xl + step < x_levels) t.push_back(index(xl + step, yl));
        if (yl + step >= 0 && yl + step < y_levels) t.push_back(index(xl, yl + step));
        return t;
    }

    // Every transition out of `s`: emit(rate, next state).
    void transitions(const State& s, const std::function<void(double, const State&)>& emit) const {
        const int T = traits();
        double na = 0, nd = 0;
        for (int i = 0; i < T; ++i) {
            na += s[i];
            nd += s[T + i];
        }
        const double nc = na + (count_dormant ? nd : 0.0);
        auto with = [&](std::initializer_list<std::pair<int, int>> changes) {
            State n = s;
            for (auto [k, delta] : changes) n[k] += delta;
            return n;
        };
        for (int i = 0; i < T; ++i) {
            const double a = s[i];
            if (a == 0) continue;
            // Division, and where the offspring lands.
            const double br = birth[i] * a;
            if (br > 0) {
                const auto fwd = targets(i, +1), bwd = targets(i, -1);
                double stay = 1 - mu;
                if (fwd.empty()) stay += mu * (1 - backward);
                if (bwd.empty()) stay += mu * backward;
                emit(br * stay, with({{i, +1}}));
                for (int t : fwd) emit(br * mu * (1 - backward) / fwd.size(), with({{t, +1}}));
                for (int t : bwd) emit(br * mu * backward / bwd.size(), with({{t, +1}}));
            }
            emit((death[i] + stress) * a, with({{i, -1}}));
            const double comp = competition[i] * a * nc / Kp;
            emit(comp * q[i], with({{i, -1}, {T + i, +1}}));
            emit(comp * (1 - q[i]), with({{i, -1}}));
            // Conjugation with cell i as recipient: every active donor at a higher y level.
            const int xi = i / y_levels, yi = i % y_levels;
            for (int j = 0; j < T; ++j) {
                if (j % y_levels <= yi || s[j] == 0) continue;
                const double rate = (density ? tau / Kp : tau / na) * a * s[j];
                const int target = transfer_only ? index(xi, j % y_levels) : j;
                emit(rate, with({{i, -1}, {target, +1}}));
            }
        }
        for (int i = 0; i < T; ++i) {
            const double dd = s[T + i];
            if (dd == 0) continue;
            emit(kappa * dd, with({{T + i, -1}}));
            emit(sigma_eff * dd, with({{T + i, -1}, {i, +1}}));
        }
    }
};

// p(t) on the states reachable from `start` within `inside`, by the matrix exponential.
struct Solution {
    std::map<State, int> index;
    std::vector<double> p;
    double lost = 0;  // probability of having left the truncated space by t
};

Solution solve(const MasterModel& m, const State& start, double t,
               const std::function<bool(const State&)>& inside) {
    Solution sol;
    std::vector<State> states{start};
    sol.index[start] = 0;
    struct Edge {
        int from, to;
        double rate;
    };
    std::vector<Edge> edges;
    std::vector<double> out_rate;
    for (std::size_t k = 0; k < states.size(); ++k) {
        const State s = states[k];
        double total = 0;
        m.transitions(s, [&](double rate, const State& next) {
            if (!(rate > 0)) return;
            total += rate;
            if (!inside(next)) return;  // leaves the truncation: loss
            auto [it, fresh] = sol.index.emplace(next, static_cast<int>(states.size()));
            if (fresh) states.push_back(next);
            edges.push_back({static_cast<int>(k), it->second, rate});
        });
        out_rate.push_back(total);
    }
    const int n = static_cast<int>(states.size());
    Eigen::MatrixXd Q = Eigen::MatrixXd::Zero(n, n);
    for (const Edge& e : edges) Q(e.from, e.to) += e.rate;
    for (int i = 0; i < n; ++i) Q(i, i) -= out_rate[static_cast<std::size_t>(i)];
    const Eigen::MatrixXd P = (Q * t).exp();
    sol.p.resize(static_cast<std::size_t>(n));
    double sum = 0;
    for (int j = 0; j < n; ++j) {
        sol.p[static_cast<std::size_t>(j)] = P(0, j);
        sum += P(0, j);
    }
    sol.lost = 1 - sum;
    return sol;
}

State state_of(const PatchRun& run) {
    State s;
    for (auto a : run.active) s.push_back(static_cast<int>(a));
    for (auto d : run.dormant) s.push_back(static_cast<int>(d));
    return s;
}

// Runs N replicates of `s` from `start` for time t with the exact engine and tests their
// end states against the master equation.
void check_master_equation(const Scenario& s, const PatchConditions& where, const State& start,
                           double t, int max_cells, std::uint64_t seed) {
    const MasterModel m(s, where);
    const Solution sol = solve(m, start, t, [&](const State& x) {
        int total = 0;
        for (int v : x) total += v;
        return total <= max_cells;
    });
    INFO(sol.p.size() << " states, probability lost by truncation " << sol.lost);
    REQUIRE(sol.p.size() >= 20);
    REQUIRE(sol.p.size() <= 1000);  // dense expm stays cheap
    const std::uint32_t N = 50000;
    // Truncation must be negligible: summed over all N replicates, the mass outside is
    // below 0.01 expected cells, so it cannot move the chi-squared statistic (and it is
    // still counted, as the "anything else" bin).
    REQUIRE(std::fabs(sol.lost) * N < 0.01);
    for (double p : sol.p) REQUIRE(p > -1e-12);

    const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
    const RateTable rates(grid, s.rates, s.K);
    std::vector<int> end(N, -1);
    for_replicates(N, [&](std::uint32_t rep) {
        PatchRun run(grid, rates, s.K, where, seed, rep);
        const int T = grid.size();
        for (int i = 0; i < T; ++i) {
            run.active[static_cast<std::size_t>(i)] = start[static_cast<std::size_t>(i)];
            run.dormant[static_cast<std::size_t>(i)] = start[static_cast<std::size_t>(T + i)];
        }
        run.advance(t);
        // Catch2 assertions are not thread-safe: mark bad states, check them below.
        bool negative = false;
        for (auto v : run.active) negative = negative || v < 0;
        for (auto v : run.dormant) negative = negative || v < 0;
        const auto it = sol.index.find(state_of(run));
        end[rep] = negative ? -2 : it == sol.index.end() ? -1 : it->second;
    });
    CHECK(std::count(end.begin(), end.end(), -2) == 0);
    std::vector<std::uint64_t> hist(sol.p.size(), 0);
    for (int e : end) {
        if (e >= 0) ++hist[static_cast<std::size_t>(e)];
    }
    const ChiSquared chi = chi_squared_test(sol.p, hist, N, chi_squared_alpha);
    INFO(chi.describe() << " (" << chi.bins << " bins)");
    CHECK(chi.passed());
}

}  // namespace

TEST_CASE("V2a logistic growth with dormancy matches the master equation", "[validation][V2]") {
    Scenario s = one_patch_scenario();
    s.K = 3.0;
    s.dormancy_axis = {1.0, 2};  // x in {0, 1}; only x = 1 is present (no mutation)
    s.rates.birth_max = 2.5;
    s.rates.birth_cost_dormancy = 0.5;  // b(1) = 2
    s.rates.death = 0.5;
    s.rates.competition = 1.0;
    s.rates.dormancy_probability = 0.5;  // q(1) = 0.5
    s.rates.dormant_death = 0.4;
    s.rates.resuscitation = 1.0;
    // State (A(0), A(1), D(0), D(1)).
    SECTION("competition by active cells") {
        check_master_equation(s, PatchConditions{}, {0, 2, 0, 0}, 1.5, 36, test_seed(201));
    }
    SECTION("competition counts dormant cells; stress, resuscitation factor, overrides") {
        s.rates.competition_counts_dormant = true;
        // Per-trait rates (so the engine takes its trait-dependent paths): q directly.
        RateOverride o;
        o.dormancy = 1.0;
        o.death = 0.7;
        o.competition = 1.3;
        o.dormancy_probability = 0.6;
        s.rates.overrides = {o};
        PatchConditions where;
        where.stress = 0.3;
        where.resuscitation = 0.5;
        s.habitats[0].stress = 0.3;
        s.habitats[0].resuscitation = 0.5;
        check_master_equation(s, where, {0, 1, 0, 3}, 1.5, 30, test_seed(202));
    }
}

TEST_CASE("V2b conjugation between two traits matches the master equation", "[validation][V2]") {
    Scenario s = one_patch_scenario();
    s.K = 3.0;
    s.transfer_axis = {1.0, 2};  // y in {0, 1}
    s.rates.birth_max = 2.5;
    s.rates.birth_cost_transfer = 0.5;  // b = 2.5 (y = 0), 2 (y = 1)
    s.rates.death = 0.5;
    s.rates.competition = 1.0;
    s.rates.transfer = 1.5;
    // State (A(y=0), A(y=1), D(y=0), D(y=1)).
    SECTION("frequency form, whole trait copied; per-trait death and competition") {
        s.rates.transfer_form = TransferForm::frequency;
        RateOverride o;
        o.transfer = 1.0;
        o.death = 0.8;
        o.competition = 1.4;
        s.rates.overrides = {o};
        check_master_equation(s, PatchConditions{}, {3, 1, 0, 0}, 1.5, 30, test_seed(211));
    }
    SECTION("density form, whole trait copied") {
        s.rates.transfer_form = TransferForm::density;
        check_master_equation(s, PatchConditions{}, {3, 1, 0, 0}, 1.5, 30, test_seed(212));
    }
    SECTION("transfer_only on a 2 x 2 grid: the recipient keeps its x") {
        s.K = 1.5;
        s.rates.birth_max = 2.0;  // b = 2, 1.5, 1.5, 1 for (0,0) (0,1) (1,0) (1,1)
        s.dormancy_axis = {1.0, 2};
        s.rates.birth_cost_dormancy = 0.5;
        s.rates.dormancy_probability = 0.0;  // no dormancy: 4 active counts only
        s.rates.transfer_copies = TransferCopies::transfer_only;
        // Recipients (x=1, y=0), donors (x=0, y=1); trait order (0,0) (0,1) (1,0) (1,1).
        check_master_equation(s, PatchConditions{}, {0, 1, 3, 0, 0, 0, 0, 0}, 1.0, 16, test_seed(213));
    }
}

TEST_CASE("V2c mutation between two traits matches the master equation", "[validation][V2]") {
    Scenario s = one_patch_scenario();
    s.K = 3.0;
    s.transfer_axis = {1.0, 2};  // y in {0, 1}; no transfer (tau = 0), so y only labels
    s.rates.birth_max = 2.5;
    s.rates.birth_cost_transfer = 0.5;
    s.rates.death = 0.5;
    s.rates.competition = 1.0;
    s.rates.mutation_exponent = std::log(5.0) / std::log(3.0);  // mu = 3^-alpha = 0.2
    s.rates.mutation_backward = 0.3;
    check_master_equation(s, PatchConditions{}, {3, 0, 0, 0}, 1.5, 30, test_seed(221));
}

TEST_CASE("V2c mutation kernel on a 2 x 2 grid: rates and the 1/2 split", "[validation][V2]") {
    Scenario s = one_patch_scenario();
    s.K = 4.0;
    s.dormancy_axis = {1.0, 2};
    s.transfer_axis = {1.0, 2};  // traits (0,0) (0,1) (1,0) (1,1)
    s.rates.death = 0.0;
    s.rates.competition = 0.0;
    s.rates.mutation_exponent = 0.5;  // mu = 4^-0.5 = 0.5
    s.rates.mutation_backward = 0.4;
    const double mu = 0.5, back = 0.4;
    struct Case {
        const char* name;
        int parent;
        int targets[2];
        double p_move;
    };
    // From (0,0): forward to (1,0) or (0,1); backward has no target. From (1,1): backward
    // to (0,1) or (1,0); forward has no target (the far corner).
    const Case cases[] = {{"forward from (0,0)", 0, {2, 1}, mu * (1 - back)},
                          {"backward from (1,1)", 3, {1, 2}, mu * back}};
    for (const Case& c : cases) {
        INFO(c.name);
        s.rates.overrides.clear();
        for (int i = 0; i < 4; ++i) {
            RateOverride o;
            o.dormancy = i / 2;
            o.transfer = i % 2;
            o.birth = i == c.parent ? 1.0 : 0.0;
            s.rates.overrides.push_back(o);
        }
        const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
        const RateTable rates(grid, s.rates, s.K);
        REQUIRE(rates.mutation_probability == Approx(mu));
        const std::uint32_t N = 2000;
        std::vector<std::array<std::int64_t, 3>> seen(N);  // births, to target 0, to target 1
        std::vector<std::uint8_t> books_ok(N, 0);
        const std::uint64_t seed = test_seed(231 + static_cast<std::uint64_t>(c.parent));
        for_replicates(N, [&](std::uint32_t rep) {
            PatchRun run(grid, rates, s.K, PatchConditions{}, seed, rep);
            run.active[static_cast<std::size_t>(c.parent)] = 10;
            run.advance(1.0);
            const auto t0 = run.active[static_cast<std::size_t>(c.targets[0])];
            const auto t1 = run.active[static_cast<std::size_t>(c.targets[1])];
            seen[rep] = {static_cast<std::int64_t>(run.counts.births), t0, t1};
            books_ok[rep] = run.counts.mutations == static_cast<std::uint64_t>(t0 + t1) &&
                            run.active_total() == 10 + static_cast<std::int64_t>(run.counts.births);
        });
        CHECK(std::count(books_ok.begin(), books_ok.end(), 0) == 0);
        double B = 0, m0 = 0, m1 = 0;
        for (const auto& v : seen) {
            B += static_cast<double>(v[0]);
            m0 += static_cast<double>(v[1]);
            m1 += static_cast<double>(v[2]);
        }
        const double M = m0 + m1, p = c.p_move;
        INFO(B << " divisions, " << M << " mutants (" << m0 << " and " << m1 << "), expected "
               << p * B);
        CHECK(std::fabs(M - p * B) <= z_tolerance * std::sqrt(p * (1 - p) * B));
        CHECK(std::fabs(m0 - M / 2) <= z_tolerance * std::sqrt(M / 4));
    }
}
