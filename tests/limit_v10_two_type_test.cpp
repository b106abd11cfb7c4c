// V10 (validation.md): the growth rate of a two-type (active, dormant) population is the
// leading eigenvalue of its mean matrix M = [[g, r sigma], [q C n / c, -(kappa + r sigma)]]
// (multitype branching processes: Athreya & Ney 1972, Branching Processes, Springer, ch. V,
// the Perron root of the mean matrix of a continuous-time multitype process). For a 2 x 2
// matrix it is the larger root of lambda^2 - tr(M) lambda + det(M) = 0 (closed form, high
// school algebra), here checked against Eigen's eigenvalue solver (leading_eigenvalue) and
// against the fitness the limit computes from the finite-difference Jacobian of the
// deterministic limit around a resident equilibrium.
//
// Tolerance: 1e-12 between Eigen and the closed form (both are exact up to rounding of
// O(1e-16) times the entries); 1e-7 for the whole pipeline (the Jacobian's Richardson step
// error, O(jacobian_step^2) = 1e-12, and the equilibrium's settle_tolerance 1e-11, each well
// inside). A factor 2 in q, sigma or kappa moves the root by more than 0.05 in every case.
#include <catch2/catch.hpp>

#include <cmath>

#include "limit_support.hpp"
#include "theory/limit_fitness.hpp"

using namespace tessera;

namespace {

double quadratic_root(double g, double up, double down, double out) {
    // M = [[g, up], [down, -out]]
    const double tr = g - out, det = -g * out - up * down;
    return 0.5 * (tr + std::sqrt(tr * tr - 4 * det));
}

}  // namespace

TEST_CASE("V10: Eigen's leading eigenvalue is the closed-form root of the two-type quadratic", "[limit][v10]") {
    struct Case {
        double g, up, down, out;
    };
    const Case cases[] = {{-1.0, 1.0, 0.6, 1.0}, {0.5, 0.2, 3.0, 0.7}, {-2.0, 5.0, 0.1, 5.3},
                          {0.0, 1.0, 1.5, 1.0},  {-0.3, 0.0, 2.0, 1.0}, {1.2, 0.5, 0.0, 0.05}};
    for (const Case& c : cases) {
        Eigen::MatrixXd m(2, 2);
        m << c.g, c.up, c.down, -c.out;
        INFO("g " << c.g << " up " << c.up << " down " << c.down << " out " << c.out);
        CHECK(leading_eigenvalue(m) == Approx(quadratic_root(c.g, c.up, c.down, c.out)).margin(1e-12));
    }
}

TEST_CASE("V10: the limit's invasion fitness of a dormancy trait is the two-type root", "[limit][v10]") {
    // Resident (0, 0) (no dormancy: q = 0), alone at n* = b - d = 3. Invader (2, 0) with its
    // own q, birth and competition (overrides); kappa and sigma vary; transfer off.
    struct Case {
        double q, sigma, kappa, birth, competition;
        bool counts_dormant;
    };
    const Case cases[] = {{0.3, 1.0, 0.0, 3.0, 1.0, false}, {0.8, 0.5, 0.2, 3.5, 1.0, false},
                          {0.5, 2.0, 0.1, 4.5, 0.7, false}, {0.9, 0.2, 0.0, 3.0, 1.3, true}};
    for (const Case& c : cases) {
        Scenario s = limittest::scenario();
        s.dormancy_axis = {2.0, 2};
        s.rates.resuscitation = c.sigma;
        s.rates.dormant_death = c.kappa;
        s.rates.competition_counts_dormant = c.counts_dormant;
        RateOverride o = limittest::override_of(2.0, 0.0);
        o.birth = c.birth;
        o.competition = c.competition;
        o.dormancy_probability = c.q;
        s.rates.overrides = {o};
        s.inocula = {limittest::cells(s, 0, 0, 1.0), limittest::cells(s, 2, 0, 0.3)};
        s.until = 0.01;
        const LimitPrediction p = predict_limit(s);
        REQUIRE(!p.phases.empty());
        const double n = 3.0;  // the resident has no dormant cells, so either way of counting gives 3
        REQUIRE(p.phases[0].residents.size() == 1);
        CHECK(p.phases[0].residents[0].active_density == Approx(n).margin(1e-9));
        const double g = c.birth - 1.0 - c.competition * n;
        const double expected = quadratic_root(g, c.sigma, c.q * c.competition * n, c.kappa + c.sigma);
        INFO("q " << c.q << " sigma " << c.sigma << " kappa " << c.kappa);
        CHECK(p.phases[0].fitness[static_cast<std::size_t>(limittest::trait(s, 2, 0))] ==
              Approx(expected).margin(1e-7));
    }
}
