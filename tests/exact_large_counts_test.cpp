// The exact engine at counts where the number of (recipient, donor) pairs for conjugation
// passes 2^63: two transfer levels of 4e9 active cells each make 1.6e19 pairs. The kept pair
// count is 128 bits wide; with 64 bits it wrapped (to 3.17e10 instead of 4.72e10 as a
// conjugation rate at 3.1e9 cells per level, found under UBSan) and could send a conjugation
// to trait -1.
//
// Reference: the conjugation rate tau / Na * L0 * L1 of model.md section 1 (frequency form),
// computed here in floating point; and ExactPatch::check_kept_sums, the validate mode's
// recomputation from scratch. Tolerance: relative 1e-12 on the rate (rounding of sums of
// 1e10-sized terms); exact equality of the recomputed integers.
#include <catch2/catch.hpp>

#include <cstdint>
#include <vector>

#include "core/exact_patch.hpp"
#include "core/scenario.hpp"

using namespace tessera;

TEST_CASE("Exact engine: conjugation pairs beyond 2^63 are counted and drawn without wrapping", "[exact][limits]") {
    Scenario s;                // 9 traits, frequency-dependent conjugation tau = 10
    s.rates.mutation_exponent = 1e9;  // no mutation: the books below stay simple
    s.K = 1e10;
    const TraitGrid g(s.dormancy_axis, s.transfer_axis);
    const RateTable r(g, s.rates, s.K);
    ExactPatch patch(g, r, s.K);
    std::vector<std::int64_t> active(static_cast<std::size_t>(g.size()), 0), dormant(active.size(), 0);
    const std::int64_t L = 4'000'000'000;
    active[static_cast<std::size_t>(*g.find(0, 0))] = L;  // transfer level 0
    active[static_cast<std::size_t>(*g.find(0, 2))] = L;  // transfer level 1
    PatchConditions where;
    patch.attach(active.data(), dormant.data(), where);
    CHECK(patch.check_kept_sums().empty());

    // The total rate: births, deaths, competition and conjugation of the two traits.
    const double na = 2.0 * static_cast<double>(L);
    double expected = 0;
    for (int i : {*g.find(0, 0), *g.find(0, 2)}) {
        expected += (r.birth[static_cast<std::size_t>(i)] + r.death[static_cast<std::size_t>(i)]) * static_cast<double>(L);
        expected += r.competition[static_cast<std::size_t>(i)] * static_cast<double>(L) * na / s.K;
    }
    expected += s.rates.transfer / na * static_cast<double>(L) * static_cast<double>(L);
    CHECK(patch.total_rate() == Approx(expected).epsilon(1e-12));

    // A few thousand events: conjugations land on real traits, the kept sums stay exact.
    Rng rng(StreamKey{7, 0, 0}, 0, Phase::local);
    EventCounts counts;
    patch.advance(active.data(), dormant.data(), where, 2e-7, rng, counts);
    CHECK(counts.conjugations > 0);
    for (std::int64_t a : active) CHECK(a >= 0);
    patch.attach(active.data(), dormant.data(), where);
    CHECK(patch.check_kept_sums().empty());
}
