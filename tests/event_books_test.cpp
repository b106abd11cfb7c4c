// Every local event type at once, and the books balance exactly.
//
// One patch of the default 3 x 3 trait grid with every mechanism of model.md section 2
// switched on: division with forward and backward mutation (mu = K^-alpha = 0.1),
// natural death plus habitat stress, competition that counts dormant cells and makes
// cells dormant with q(x) = p x up to 0.4, conjugation (frequency and density forms, whole
// and transfer_only copies), dormant death and resuscitation (with a habitat factor).
// Whatever the engine draws, its counts must obey, at every observation time,
//
//   active  = A0 + births - deaths - competition_deaths - dormancies + resuscitations
//   dormant = D0 + dormancies - dormant_deaths - resuscitations
//   cells   = N0 + births - deaths - competition_deaths - dormant_deaths
//
// and no count may go negative. These are identities, not statistics: no tolerance. The
// test also requires that every event type (and mutation and conjugation) actually
// happened, so none of the identities holds vacuously.
#include <catch2/catch.hpp>

#include <cstdint>
#include <string>
#include <vector>

#include "core/engine.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::validation;

namespace {

struct Totals {
    std::int64_t active = 0, dormant = 0;
    bool negative = false;
};

Totals totals_of(const Engine& e) {
    Totals t;
    for (int i = 0; i < e.traits().size(); ++i) {
        const std::int64_t a = e.lattice().active(0)[i], d = e.lattice().dormant(0)[i];
        t.negative = t.negative || a < 0 || d < 0;
        t.active += a;
        t.dormant += d;
    }
    return t;
}

}  // namespace

TEST_CASE("the books balance with every event type switched on", "[validation][books]") {
    Scenario s = one_patch_scenario();
    s.K = 100.0;
    s.dormancy_axis = {4.0, 3};
    s.transfer_axis = {4.0, 3};
    s.rates.birth_max = 4.0;
    s.rates.dormancy_probability = 0.1;  // q = 0, 0.2, 0.4
    s.rates.transfer = 3.0;
    s.rates.dormant_death = 0.3;
    s.rates.resuscitation = 1.0;
    s.rates.mutation_exponent = 0.5;  // mu = 0.1
    s.rates.mutation_backward = 0.3;
    s.rates.competition_counts_dormant = true;
    s.habitats[0].stress = 0.2;
    s.habitats[0].resuscitation = 0.7;
    s.sync = 0.01;
    for (double x : {0.0, 2.0, 4.0}) {
        for (double y : {0.0, 2.0, 4.0}) s.inocula.push_back(inoculum(x, y, 20, 5));
    }

    const std::pair<TransferForm, TransferCopies> modes[] = {
        {TransferForm::frequency, TransferCopies::whole},
        {TransferForm::frequency, TransferCopies::transfer_only},
        {TransferForm::density, TransferCopies::whole},
        {TransferForm::density, TransferCopies::transfer_only}};
    for (const auto& [form, copies] : modes) {
        s.rates.transfer_form = form;
        s.rates.transfer_copies = copies;
        for (std::uint32_t rep = 0; rep < 4; ++rep) {
            INFO("transfer_form " << (form == TransferForm::frequency ? "frequency" : "density")
                                  << ", transfer_copies "
                                  << (copies == TransferCopies::whole ? "whole" : "transfer_only")
                                  << ", replicate " << rep);
            s.seed = test_seed(901);
            Engine engine(s, rep);
            const Totals start = totals_of(engine);
            REQUIRE(start.active == 9 * 20);
            REQUIRE(start.dormant == 9 * 5);
            for (int k = 1; k <= 100; ++k) {
                engine.advance_to(0.05 * k);
                const Totals now = totals_of(engine);
                const EventCounts c = engine.totals();
                const auto births = static_cast<std::int64_t>(c.births);
                const auto deaths = static_cast<std::int64_t>(c.deaths);
                const auto comp = static_cast<std::int64_t>(c.competition_deaths);
                const auto dorm = static_cast<std::int64_t>(c.dormancies);
                const auto ddeath = static_cast<std::int64_t>(c.dormant_deaths);
                const auto resus = static_cast<std::int64_t>(c.resuscitations);
                INFO("t = " << engine.time());
                REQUIRE_FALSE(now.negative);
                REQUIRE(now.active == start.active + births - deaths - comp - dorm + resus);
                REQUIRE(now.dormant == start.dormant + dorm - ddeath - resus);
                REQUIRE(now.active + now.dormant ==
                        start.active + start.dormant + births - deaths - comp - ddeath);
                REQUIRE(c.mutations <= c.births);
                REQUIRE(now.active + now.dormant > 0);  // the run stays informative
            }
            const EventCounts c = engine.totals();
            CHECK(c.births > 0);
            CHECK(c.mutations > 0);
            CHECK(c.deaths > 0);
            CHECK(c.competition_deaths > 0);
            CHECK(c.dormancies > 0);
            CHECK(c.dormant_deaths > 0);
            CHECK(c.resuscitations > 0);
            CHECK(c.conjugations > 0);
        }
    }
}
