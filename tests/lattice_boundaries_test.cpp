// Every boundary rule (reflecting, periodic, absorbing) and neighbourhood (4, 8) of
// model.md section 3, in both engines.
//
// 1. The neighbour table itself, by hand, on a 3 x 3 lattice (deterministic).
// 2. Cells that only migrate, started in the top-left corner of a 3 x 3 lattice. A cell's
//    position (9 patches, plus "lost" for absorbing edges) is a Markov chain whose law is
//    computed here from the rules as written in model.md, not from src/core:
//      - exact spatial engine: generator Q (a jump at rate m to each of the k neighbours at
//        m/k; towards a cancelled target nothing happens), law e_0 exp(Q t) by Eigen's
//        matrix exponential;
//      - split engine: one step moves a cell with probability 1 - e^{-m dt}, to each
//        direction with 1/k of that; n steps: e_0 M^n.
//    Checked: cells only ever land where the rule allows (deterministic: one split step
//    moves a cell at most one jump), cells are never made or destroyed except through an
//    absorbing edge and Engine::lost() counts exactly those, and the landing frequencies
//    fit the law (Pearson chi-squared, size chi_squared_alpha; chain laws as in
//    Karlin & Taylor 1975, A First Course in Stochastic Processes).
#include <catch2/catch.hpp>

#include <Eigen/Dense>
#include <unsupported/Eigen/MatrixFunctions>

#include <array>
#include <cmath>
#include <string>
#include <vector>

#include "core/neighbourhood.hpp"
#include "spatial_support.hpp"

using namespace tessera;
using namespace tessera::spatial;
using namespace tessera::validation;

namespace {

constexpr int side = 3;
constexpr int states = side * side + 1;  // the 9 patches, then "lost"
constexpr int lost_state = side * side;
constexpr int cells_per_replicate = 5;

// The rule of model.md: a jump in direction (dx, dy) from (c, r); -1 = cancelled (stays),
// lost_state = lost through an absorbing edge.
int target(int c, int r, int dx, int dy, Boundary boundary) {
    int tc = c + dx, tr = r + dy;
    const bool off = tc < 0 || tc >= side || tr < 0 || tr >= side;
    if (off) {
        if (boundary == Boundary::reflecting) return -1;
        if (boundary == Boundary::absorbing) return lost_state;
        tc = (tc + side) % side;
        tr = (tr + side) % side;
    }
    return tr * side + tc;
}

std::vector<std::array<int, 2>> directions(int k) {
    std::vector<std::array<int, 2>> d{{0, -1}, {1, 0}, {0, 1}, {-1, 0}};
    if (k == 8) d.insert(d.end(), {{1, -1}, {1, 1}, {-1, 1}, {-1, -1}});
    return d;
}

// Rate (or probability) of moving from each patch to each state, for a jump of weight w
// spread over the k directions.
Eigen::MatrixXd moves(int k, Boundary boundary, double w) {
    Eigen::MatrixXd A = Eigen::MatrixXd::Zero(states, states);
    for (int p = 0; p < side * side; ++p) {
        for (const auto& d : directions(k)) {
            const int to = target(p % side, p / side, d[0], d[1], boundary);
            if (to >= 0) A(p, to) += w / k;
        }
    }
    return A;
}

Eigen::RowVectorXd law_exact(int k, Boundary boundary, double m, double t) {
    Eigen::MatrixXd Q = moves(k, boundary, m);
    for (int p = 0; p < states; ++p) Q(p, p) = -Q.row(p).sum();
    Eigen::RowVectorXd start = Eigen::RowVectorXd::Zero(states);
    start(0) = 1.0;
    return start * (Q * t).exp();
}

Eigen::RowVectorXd law_split(int k, Boundary boundary, double m, double dt, int steps) {
    Eigen::MatrixXd M = moves(k, boundary, -std::expm1(-m * dt));
    for (int p = 0; p < states; ++p) M(p, p) = 1.0 - M.row(p).sum();  // stays (lost stays lost)
    Eigen::RowVectorXd x = Eigen::RowVectorXd::Zero(states);
    x(0) = 1.0;
    for (int i = 0; i < steps; ++i) x = x * M;
    return x;
}

struct Landing {
    std::vector<std::uint64_t> count = std::vector<std::uint64_t>(states, 0);
    bool books_balance = true;  // cells now + lost() = cells at the start, every replicate
};

Landing simulate(int k, Boundary boundary, Method method, double m, double sync, double until, std::uint32_t R,
                 std::uint64_t seed) {
    Scenario s = quiet_lattice(side, side);
    s.neighbourhood = k;
    s.boundary = boundary;
    s.rates.migration = m;
    s.inocula = {cells_at(0, 0, cells_per_replicate)};
    s.method = method;
    s.sync = sync;
    s.seed = seed;
    std::vector<std::vector<std::int64_t>> where(R, std::vector<std::int64_t>(states, 0));
    std::vector<std::uint8_t> balance(R, 0);
    for_replicates(R, [&](std::uint32_t r) {
        Engine e(s, r);
        e.advance_to(until);
        for (std::size_t p = 0; p < e.lattice().patches(); ++p) where[r][p] = active_in(e, p);
        where[r][lost_state] = static_cast<std::int64_t>(e.lost());
        balance[r] = cells(e) + static_cast<std::int64_t>(e.lost()) == cells_per_replicate;
    });
    Landing out;
    for (std::uint32_t r = 0; r < R; ++r) {
        out.books_balance = out.books_balance && balance[r] == 1;
        for (int i = 0; i < states; ++i) out.count[static_cast<std::size_t>(i)] += static_cast<std::uint64_t>(where[r][static_cast<std::size_t>(i)]);
    }
    return out;
}

std::string boundary_name(Boundary b) {
    return b == Boundary::reflecting ? "reflecting" : b == Boundary::periodic ? "periodic" : "absorbing";
}

void check_fit(const Landing& seen, const Eigen::RowVectorXd& law, std::uint32_t R) {
    std::vector<double> p(states);
    for (int i = 0; i < states; ++i) p[static_cast<std::size_t>(i)] = law(i);
    const ChiSquared chi = chi_squared_test(p, seen.count, std::uint64_t{R} * cells_per_replicate, chi_squared_alpha);
    INFO(chi.describe());
    CHECK(chi.passed());
}

}  // namespace

TEST_CASE("the neighbour table follows the boundary rule", "[space][boundary]") {
    // From the corner (0, 0) of a 3 x 3 lattice, in the fixed order N, E, S, W, NE, SE, SW, NW.
    const std::array<std::int64_t, 8> periodic{6, 1, 3, 2, 7, 4, 5, 8};
    for (Boundary b : {Boundary::reflecting, Boundary::periodic, Boundary::absorbing}) {
        const Neighbourhood n(side, side, 8, b);
        for (int dir = 0; dir < 8; ++dir) {
            INFO(boundary_name(b) << ", direction " << dir);
            const auto to = n.step(0, 0, dir);
            if (b == Boundary::periodic) {
                REQUIRE(to.kind == Neighbourhood::Target::patch);
                CHECK(to.patch == periodic[static_cast<std::size_t>(dir)]);
            } else {
                const bool inside = dir == 1 || dir == 2 || dir == 5;  // E, S, SE
                CHECK((to.kind == Neighbourhood::Target::patch) == inside);
                if (inside) CHECK(to.patch == periodic[static_cast<std::size_t>(dir)]);
            }
        }
        // From the centre every direction stays on the lattice.
        for (int dir = 0; dir < 8; ++dir) CHECK(n.step(1, 1, dir).kind == Neighbourhood::Target::patch);
        for (int dir = 0; dir < 8; ++dir) CHECK(Neighbourhood::opposite(Neighbourhood::opposite(dir)) == dir);
    }
    CHECK(Neighbourhood(side, side, 4, Boundary::periodic).size() == 4);
}

TEST_CASE("one split step lands a cell only where the boundary rule allows", "[space][boundary]") {
    constexpr std::uint32_t R = 3000;
    for (int k : {4, 8}) {
        for (Boundary b : {Boundary::reflecting, Boundary::periodic, Boundary::absorbing}) {
            INFO(k << "-neighbourhood, " << boundary_name(b));
            const Landing seen = simulate(k, b, Method::exact, 2.0, 0.3, 0.3, R, test_seed(801 + k * 10 + static_cast<int>(b)));
            CHECK(seen.books_balance);
            const Eigen::RowVectorXd law = law_split(k, b, 2.0, 0.3, 1);
            for (int i = 0; i < states; ++i) {
                INFO("state " << i << " (9 = lost): seen " << seen.count[static_cast<std::size_t>(i)] << ", law " << law(i));
                if (law(i) == 0.0) CHECK(seen.count[static_cast<std::size_t>(i)] == 0);  // never where not allowed
                if (law(i) > 0.01) CHECK(seen.count[static_cast<std::size_t>(i)] > 0);   // P(missed) < 1e-60
            }
            if (b != Boundary::absorbing) CHECK(seen.count[lost_state] == 0);
            if (b == Boundary::periodic) CHECK(seen.count[2] > 0);  // wrapped west from column 0
            check_fit(seen, law, R);
        }
    }
}

TEST_CASE("several split steps and the exact spatial engine follow the boundary rule", "[space][boundary]") {
    constexpr std::uint32_t R = 3000;
    for (int k : {4, 8}) {
        for (Boundary b : {Boundary::reflecting, Boundary::periodic, Boundary::absorbing}) {
            INFO(k << "-neighbourhood, " << boundary_name(b));
            const auto seed = test_seed(851 + k * 10 + static_cast<int>(b));
            const Landing split = simulate(k, b, Method::exact, 2.0, 0.3, 0.9, R, seed);
            CHECK(split.books_balance);
            check_fit(split, law_split(k, b, 2.0, 0.3, 3), R);
            const Landing exact = simulate(k, b, Method::exact_spatial, 2.0, 0.3, 0.9, R, seed + 1);
            CHECK(exact.books_balance);
            check_fit(exact, law_exact(k, b, 2.0, 0.9), R);
            if (b != Boundary::absorbing) CHECK(exact.count[lost_state] == 0);
        }
    }
}
