// checkpoint.bin in process: the format round trip, every refusal (foreign, other version,
// truncated, corrupted) and an engine restored from a checkpoint continuing bit for bit,
// for each method and 1 or 2 threads. The whole program (signals, files) is in resume_test.
#include <catch2/catch.hpp>
#include <tbb/global_control.h>

#include <atomic>
#include <string>
#include <vector>

#include "core/engine.hpp"
#include "io/checkpoint.hpp"
#include "io/checksum.hpp"
#include "run_support.hpp"

using namespace tessera;

namespace {

Scenario lattice_scenario(Method method, double K) {
    Scenario s;
    s.K = K;
    s.width = 4;
    s.height = 3;
    s.boundary = Boundary::absorbing;  // so `lost` moves too
    Habitat open;
    Habitat stressed;
    stressed.name = "stressed";
    stressed.symbol = "s";
    stressed.stress = 1.5;
    s.habitats = {open, stressed};
    s.habitat_of_patch.assign(12, 0);
    s.habitat_of_patch[5] = 1;
    Schedule pulse;  // conditions that change during the run
    pulse.habitat = "open";
    pulse.start = 0.3;
    pulse.end = 0.5;
    pulse.every = 0.6;
    pulse.stress = 2.0;
    s.schedules = {pulse};
    s.rates.transfer = 3.0;
    s.rates.migration = 0.3;
    s.rates.migration_dormant = 0.05;
    s.rates.mutation_exponent = 0.3;
    Inoculum in;
    in.exponent = 1.0;
    in.dormant = 5;
    s.inocula = {in};
    s.time_unit = TimeUnit::plain;
    s.until = 2.0;
    s.output_every = 0.25;
    s.fields_every = 0.0;
    s.sync = 0.05;
    s.method = method;
    s.seed = 9;
    return s;
}

// Collects series rows and the engine's books at every look; asks the run to stop after
// `stop_after` observations (0: never).
struct Collect : runtest::CollectSeries {
    int seen = 0;
    int stop_after = 0;
    std::atomic<bool> stop{false};
    void observe(const Engine& e, unsigned kinds) override {
        CollectSeries::observe(e, kinds);
        text += "lost " + std::to_string(e.lost()) + " migrants " + std::to_string(e.migrants()) + " births " +
                std::to_string(e.totals().births) + " step " + std::to_string(e.step_number()) + "\n";
        if (++seen == stop_after) stop = true;
    }
};

ReplicateCheckpoint section_of(const Engine& e) {
    ReplicateCheckpoint r;
    r.stage = ReplicateCheckpoint::Stage::running;
    r.state = e.state();
    r.outputs = {123, 456, 7, 8};
    return r;
}

std::string file_of(const Engine& e, const std::vector<std::uint16_t>& map) {
    return encode_checkpoint("title = \"x\"\n", map, {encode_replicate(section_of(e))});
}

}  // namespace

TEST_CASE("FNV-1a 64 matches the published vectors", "[checkpoint]") {
    CHECK(fnv1a64("foobar") == 0x85944171f73967e8ull);
    CHECK(fnv1a64("bar", fnv1a64("foo")) == fnv1a64("foobar"));  // continuing a hash
}

TEST_CASE("A checkpoint reads back exactly what was written", "[checkpoint]") {
    Scenario s = lattice_scenario(Method::exact, 200);
    Engine e(s);
    e.advance_to(0.3);
    const std::string bytes = file_of(e, s.habitat_of_patch);
    const Checkpoint c = decode_checkpoint(bytes, "mem");
    REQUIRE(c.replicates.size() == 1);
    const Engine::State& got = c.replicates[0].state;
    const Engine::State want = e.state();
    CHECK(got.time == want.time);
    CHECK(got.step == want.step);
    CHECK(got.active == want.active);
    CHECK(got.dormant == want.dormant);
    CHECK(got.lost == want.lost);
    CHECK(got.migrants == want.migrants);
    REQUIRE(got.patch_counts.size() == want.patch_counts.size());
    CHECK(got.patch_counts[3].births == want.patch_counts[3].births);
    CHECK(got.class_conditions.size() == want.class_conditions.size());
    CHECK(c.replicates[0].outputs.snapshots == 7);
    CHECK(c.habitat_of_patch == s.habitat_of_patch);
    CHECK(c.scenario_text == "title = \"x\"\n");
}

TEST_CASE("A bad checkpoint is refused with the file name and the reason", "[checkpoint]") {
    Scenario s = lattice_scenario(Method::exact, 200);
    Engine e(s);
    const std::string good = file_of(e, s.habitat_of_patch);
    auto refusal = [](const std::string& bytes) {
        try {
            decode_checkpoint(bytes, "run/checkpoint.bin");
        } catch (const CheckpointError& err) {
            return std::string(err.what());
        }
        return std::string("accepted");
    };
    using Catch::Matchers::Contains;
    CHECK_THAT(refusal("title = 1\n"), Contains("run/checkpoint.bin: not a tessera checkpoint"));
    CHECK_THAT(refusal(""), Contains("not a tessera checkpoint"));
    CHECK_THAT(refusal(good.substr(0, good.size() - 100)), Contains("truncated"));
    CHECK_THAT(refusal(good.substr(0, 12)), Contains("truncated"));
    std::string flipped = good;
    flipped[good.size() / 2] ^= 0x10;
    CHECK_THAT(refusal(flipped), Contains("corrupted: the checksum does not match"));
    std::string other = good;
    other[8] = 99;  // format version 99
    CHECK_THAT(refusal(other), Contains("format version 99") && Contains("reads version 1"));
    CHECK(refusal(good) == "accepted");
    // Well-formed, checksummed, and still impossible: a negative count, a count past 2^62.
    for (std::int64_t bad : {std::int64_t{-5}, (std::int64_t{1} << 62) + 1}) {
        ReplicateCheckpoint r = section_of(e);
        r.state.active[2] = bad;
        const std::string forged = encode_checkpoint("title = \"x\"\n", s.habitat_of_patch, {encode_replicate(r)});
        CHECK_THAT(refusal(forged), Contains("run/checkpoint.bin: malformed checkpoint") &&
                                        Contains("cell count of " + std::to_string(bad)));
    }
}

TEST_CASE("An engine restored from a checkpoint continues bit for bit", "[checkpoint]") {
    const auto [method, K] = GENERATE(std::pair{Method::exact, 150.0}, std::pair{Method::leap, 1e6},
                                      std::pair{Method::auto_select, 3e3}, std::pair{Method::exact_spatial, 100.0});
    const int threads = GENERATE(1, 2);
    const int stop_after = GENERATE(1, 3, 6);
    CAPTURE(static_cast<int>(method), threads, stop_after);
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    const Scenario s = lattice_scenario(method, K);

    Collect whole;
    Engine reference(s);
    reference.run(whole);

    Collect first;
    first.stop_after = stop_after;
    Engine before(s);
    before.run(first, &first.stop);
    REQUIRE(before.time() < before.until());
    // Through the bytes of a file, as `tessera resume` does.
    const Checkpoint c = decode_checkpoint(file_of(before, s.habitat_of_patch), "mem");
    Collect rest;
    Engine after(s);
    after.restore(c.replicates[0].state);
    after.run(rest, nullptr, /*resumed=*/true);
    CHECK(first.text + rest.text == whole.text);
}

TEST_CASE("Restoring a state of another shape is refused and changes nothing", "[checkpoint]") {
    Scenario s = lattice_scenario(Method::exact, 200);
    Engine e(s);
    Engine::State wrong = e.state();
    wrong.active.pop_back();
    const auto before = e.state().active;
    CHECK_THROWS_AS(e.restore(wrong), std::invalid_argument);
    CHECK(e.state().active == before);
}
