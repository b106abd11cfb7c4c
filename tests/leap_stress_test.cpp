// The leap engine never makes a count negative, lets populations go extinct, keeps the
// books (initial + births + resuscitations - ... = now), and rejects and halves a leap
// that would overdraw a count (Cao, Gillespie & Petzold 2005, J. Chem. Phys. 122:054103,
// step 6). These are properties, not statistics: each check must hold in every run.
//
// Scenarios: (1) a crash: K = 1e6 cells of 9 traits put under a stress of 12 (death far
// above birth), so the population falls from 1e6 through tiny sub-populations to 0 within a
// few time units; (2) the same with epsilon = 3, a step-size rule that lets leaps
// overdraw, so rejections must happen and must still keep every count non-negative;
// (3) conjugation draining small recipient traits.
#include <catch2/catch.hpp>

#include <cstdint>
#include <vector>

#include "leap_support.hpp"
#include "validation_support.hpp"

using namespace tessera;
using namespace tessera::leaptest;

namespace {

// Active + dormant now, against the books: every event's effect on the total.
std::int64_t books(const EventCounts& c, std::int64_t initial) {
    return initial + static_cast<std::int64_t>(c.births) - static_cast<std::int64_t>(c.deaths) -
           static_cast<std::int64_t>(c.competition_deaths) - static_cast<std::int64_t>(c.dormant_deaths);
}

struct CrashResult {
    bool negative = false;
    bool books_kept = true;
    bool extinct = false;
    LeapStats stats;
};

CrashResult crash(const Scenario& s, LeapSettings settings, std::uint32_t rep, double stress) {
    const TraitGrid g(s.dormancy_axis, s.transfer_axis);
    const RateTable r(g, s.rates, s.K);
    PatchConditions where;
    where.stress = stress;
    OnePatch<LeapPatch> run(g, r, s.K, where, validation::test_seed(77), rep, settings);
    for (int i = 0; i < g.size(); ++i) {
        run.active[i] = static_cast<std::int64_t>(s.K / g.size());
        run.dormant[i] = i % 3 == 0 ? 50 : 3;  // tiny dormant pools: critical channels
    }
    const std::int64_t initial = run.total();
    CrashResult out;
    for (int step = 0; step < 400 && run.total() > 0; ++step) {
        run.advance(0.05);
        for (int i = 0; i < g.size(); ++i) {
            if (run.active[i] < 0 || run.dormant[i] < 0) out.negative = true;
        }
        if (run.total() != books(run.counts, initial)) out.books_kept = false;
    }
    out.extinct = run.total() == 0;
    out.stats = run.patch.stats();
    return out;
}

Scenario crash_scenario() {
    Scenario s;  // default 9 traits with mutation, dormancy, conjugation
    s.K = 1e6;
    s.rates.dormant_death = 2.0;  // dormant cells die too, so extinction comes
    return s;
}

}  // namespace

TEST_CASE("Leap engine: a crash under stress goes extinct with no negative count", "[leap][stress]") {
    for (std::uint32_t rep = 0; rep < 20; ++rep) {
        const CrashResult r = crash(crash_scenario(), LeapSettings{}, rep, 12.0);
        INFO("replicate " << rep << ": leaps " << r.stats.leaps << ", rejected " << r.stats.rejected
                          << ", exact events " << r.stats.exact_events);
        CHECK_FALSE(r.negative);
        CHECK(r.books_kept);
        CHECK(r.extinct);
        CHECK(r.stats.leaps > 0);          // the large phase leaps...
        CHECK(r.stats.exact_events > 0);   // ...and the last cells go one event at a time
    }
}

TEST_CASE("Leap engine: overdrawing leaps are rejected and halved, counts stay non-negative", "[leap][stress]") {
    LeapSettings loose;
    loose.epsilon = 3.0;       // allows leaps that change counts by 100%: overdraws are common
    loose.critical_cells = 2;  // and leaves even small traits to Poisson draws
    std::uint64_t rejected = 0;
    for (std::uint32_t rep = 0; rep < 20; ++rep) {
        const CrashResult r = crash(crash_scenario(), loose, rep, 12.0);
        CHECK_FALSE(r.negative);
        CHECK(r.books_kept);
        CHECK(r.extinct);
        rejected += r.stats.rejected;
    }
    INFO("rejected leaps over 20 replicates: " << rejected);
    CHECK(rejected > 0);
}

TEST_CASE("Leap engine: conjugation drains small recipient traits without overdrawing", "[leap][stress]") {
    Scenario s = crash_scenario();
    s.K = 1e5;
    s.rates.transfer = 200.0;  // recipients are converted at up to 200 per cell per unit time
    for (TransferCopies copies : {TransferCopies::whole, TransferCopies::transfer_only}) {
        s.rates.transfer_copies = copies;
        for (std::uint32_t rep = 0; rep < 10; ++rep) {
            const CrashResult r = crash(s, LeapSettings{}, rep, 0.0);
            CHECK_FALSE(r.negative);
            CHECK(r.books_kept);
        }
    }
}
