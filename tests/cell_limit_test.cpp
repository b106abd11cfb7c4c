// Runs that outgrow the counts (docs/reliability.md): a population that grows past 2^62
// cells in a patch during a run stops cleanly, at a step boundary below the limit, with a
// message naming the scenario file, the time, the patch, the trait, the limit and the
// remedy; `tessera run` exits 2 with its outputs and a checkpoint of that state kept, and
// `tessera view`'s worker stops and reports instead of crashing. Before this, the repro below
// (rates.competition = 0, K = 1e6, until = 40 plain) hung at t = 27.3: near 2^63 every
// leap overflowed and was halved down to exact stretches of ~1e-18 time units.
#include <catch2/catch.hpp>

#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <limits>
#include <string>
#include <thread>

#include "core/count_limit.hpp"
#include "core/engine.hpp"
#include "io/checkpoint.hpp"
#include "io/scenario_loader.hpp"
#include "io/series_writer.hpp"
#include "render/sim_worker.hpp"

namespace fs = std::filesystem;
using namespace tessera;
using Catch::Matchers::Contains;

namespace {

__extension__ using int128 = __int128;  // sums of counts that cannot wrap

// The repro of issue #6: one patch, nothing limits growth.
const std::string unbounded = "title = \"grows without bound\"\n"
                              "[rates]\ncompetition = 0\n"
                              "[scale]\nK = 1e6\n"
                              "[run]\nuntil = 40\ntime_unit = \"plain\"\n";

struct CountOutputs : Observer {
    int series = 0;
    double last = -1.0;
    void observe(const Engine& e, unsigned kinds) override {
        if (kinds & series_output) ++series;
        last = e.time();
    }
};

// The most cells in any patch, summed exactly (in 128 bits).
double fullest_patch(const Engine& e) {
    const Lattice& l = e.lattice();
    double most = 0.0;
    for (std::size_t p = 0; p < l.patches(); ++p) {
        int128 n = 0;
        for (int i = 0; i < l.traits(); ++i) n += l.active(p)[i] + l.dormant(p)[i];
        most = std::max(most, static_cast<double>(n));
    }
    return most;
}

// Runs `e` to its end; returns the CellLimitError's message ("" if it finished).
std::string run_to_limit(Engine& e, CountOutputs& outputs) {
    try {
        e.run(outputs);
    } catch (const CellLimitError& error) {
        CHECK(error.time() == e.time());
        return error.what();
    }
    return "";
}

}  // namespace

TEST_CASE("a population without competition stops below 2^62 with the place, the limit and the remedy") {
    const Scenario s = parse_scenario(unbounded, "unbounded.toml");
    Engine e(s);
    CountOutputs outputs;
    const std::string message = run_to_limit(e, outputs);
    INFO(message);
    CHECK_THAT(message, Contains("unbounded.toml: the population grows without bound: at t = 26."));
    CHECK_THAT(message, Contains("patch X=0, Y=0 holds 4."));
    CHECK_THAT(message, Contains("active, trait [0, 4])"));
    CHECK_THAT(message, Contains("the limit of 2^62 (4.6e18) cells per patch"));
    CHECK_THAT(message, Contains("rates.competition = 0, so nothing limits growth: set rates.competition > 0 or "
                                 "lower run.until"));
    // At a step boundary below the limit, within one default step (growth e^(4 * 0.01)) of it.
    const double most = fullest_patch(e);
    CHECK(most < cell_limit_real);
    CHECK(most > cell_limit_real / 1.05);
    CHECK(e.time() > 26.0);
    CHECK(e.time() < 27.0);
    for (std::int64_t n : e.lattice().all_active()) CHECK(n >= 0);
    // Every output due up to the stop was handed out (every 0.1 plain from t = 0).
    CHECK(outputs.series == static_cast<int>(std::floor(e.time() / 0.1 + 1e-9)) + 1);
}

TEST_CASE("long steps are cut short near the limit, so a run stops within 10% of it, never past") {
    // sync and output intervals of 10: one step could multiply the cells by e^40.
    Scenario s = parse_scenario(unbounded + "sync = 10\n[output]\nevery = 10\nfields_every = 0\n", "long.toml");
    Engine e(s);
    CountOutputs outputs;
    const std::string message = run_to_limit(e, outputs);
    REQUIRE_THAT(message, Contains("2^62"));
    const double most = fullest_patch(e);
    CHECK(most < cell_limit_real);
    CHECK(most > cell_limit_real / 1.1 / 1.01);
    CHECK(outputs.series == 3);  // t = 0, 10, 20
}

TEST_CASE("on a lattice the fullest patch is named, with the time in run.time_unit") {
    const Scenario s = parse_scenario("[rates]\ncompetition = 0\nmigration = 0.5\n[scale]\nK = 1e4\n"
                                      "[lattice]\nwidth = 3\nheight = 2\nboundary = \"periodic\"\n"
                                      "[[inoculum]]\nwhere = \"patch:2,1\"\ntrait = [0.0, 0.0]\nactive = 100\n"
                                      "[run]\nuntil = 6\n",
                                      "lattice.toml");
    Engine e(s);
    CountOutputs outputs;
    const std::string message = run_to_limit(e, outputs);
    INFO(message);
    REQUIRE_THAT(message, Contains("lattice.toml: the population grows without bound: at t/lnK = "));
    // The patch it names is the fullest one.
    double most = 0.0;
    std::string fullest;
    for (int row = 0; row < 2; ++row) {
        for (int col = 0; col < 3; ++col) {
            const std::size_t p = e.lattice().patch_at(col, row);
            double n = 0.0;
            for (int i = 0; i < e.lattice().traits(); ++i)
                n += static_cast<double>(e.lattice().active(p)[i]) + static_cast<double>(e.lattice().dormant(p)[i]);
            if (n > most) {
                most = n;
                fullest = "patch X=" + std::to_string(col) + ", Y=" + std::to_string(row) + " holds";
            }
        }
    }
    CHECK_THAT(message, Contains(fullest));
    CHECK(most < cell_limit_real);
}

TEST_CASE("every method refuses to step from a state that could pass the limit, and changes nothing") {
    for (const char* method : {"auto", "exact", "leap", "exact-spatial"}) {
        INFO(method);
        const Scenario s = parse_scenario(unbounded + "method = \"" + method + "\"\n", "restored.toml");
        Engine e(s);
        Engine::State state = e.state();
        state.active.assign(state.active.size(), 0);
        state.active[2] = 4'500'000'000'000'000'000;  // trait [0, 4]: within 2.5% of 2^62
        e.restore(state);
        REQUIRE_THROWS_AS(e.advance_to(1.0), CellLimitError);
        CHECK(e.step_number() == 0);
        CHECK(e.time() == 0.0);
        CHECK(e.state().active == state.active);
    }
}

TEST_CASE("a large but bounded population is not stopped, with short or long steps") {
    // K_p = 1e18, the largest the loader accepts: the population settles near
    // K (b - d) / c = 3e18, two thirds of the limit. No mutation, so one trait.
    for (const std::string steps : {"", "sync = 1\n[output]\nevery = 1\nfields_every = 0\n"}) {
        INFO(steps);
        const Scenario s = parse_scenario("[rates]\nmutation_exponent = inf\n[scale]\nK = 1e18\n"
                                          "[run]\nuntil = 3\ntime_unit = \"plain\"\n" + steps,
                                          "bounded.toml");
        Engine e(s);
        CountOutputs outputs;
        CHECK(run_to_limit(e, outputs) == "");
        CHECK(e.time() == 3.0);
        CHECK(fullest_patch(e) > 2.9e18);
    }
}

TEST_CASE("series sum a lattice of full patches past 2^63 without wrapping") {
    // Four patches of 3e18 cells each: every patch is below the limit, the lattice is not.
    const Scenario s = parse_scenario("[scale]\nK = 1e18\n[lattice]\nwidth = 4\n", "wide.toml");
    Engine e(s);
    Engine::State state = e.state();
    state.active.assign(state.active.size(), 0);
    state.dormant.assign(state.dormant.size(), 0);
    const int T = e.lattice().traits();
    for (std::size_t p = 0; p < 4; ++p) {
        state.active[p * T] = 3'000'000'000'000'000'000;
        state.dormant[p * T] = 2'000'000'000'000'000'000;
    }
    e.restore(state);
    std::string series, habitats;
    append_series_rows(e, series);
    append_habitat_series_rows(e, habitats);
    CHECK_THAT(series, Contains("0,0,0,0,0,12000000000000000000,8000000000000000000,"));
    // The last column, exponent_per_patch, divides the total by P = 4 patches of capacity 1:
    // log(1 + 5e18) / log(1e18).
    CHECK_THAT(habitats, Contains(",0,0,12000000000000000000,8000000000000000000,1.0388316669075566\n"));
}

TEST_CASE("tessera view's worker stops at the limit and reports it, without crashing") {
    SimWorker worker(parse_scenario(unbounded, "view.toml"));
    worker.set_speed(1e12);
    const auto give_up = std::chrono::steady_clock::now() + std::chrono::seconds(30);
    while (!worker.finished() && std::chrono::steady_clock::now() < give_up)
        std::this_thread::sleep_for(std::chrono::milliseconds(5));
    REQUIRE(worker.finished());
    CHECK_THAT(worker.error(), Contains("view.toml: the population grows without bound"));
    CHECK_THAT(worker.error(), Contains("2^62"));
    FieldSnapshot snapshot;
    std::vector<TraitHistoryPoint> history;
    worker.fetch(0, snapshot, history);
    CHECK(snapshot.t > 26.0);
    CHECK(snapshot.t < 40.0);
    // A restart (paused, so that it stays at t = 0) clears the error.
    worker.set_paused(true);
    worker.restart(2);
    const auto again = std::chrono::steady_clock::now() + std::chrono::seconds(30);
    while (!worker.error().empty() && std::chrono::steady_clock::now() < again)
        std::this_thread::sleep_for(std::chrono::milliseconds(1));
    CHECK(worker.error().empty());
    CHECK(!worker.finished());
}

#ifdef TESSERA_BINARY
namespace {

std::string slurp(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

// Runs the program; returns its exit code, its stderr through `err`.
int program(const std::string& args, const fs::path& err_file, std::string& err) {
    const std::string cmd = "'" + std::string(TESSERA_BINARY) + "' " + args + " >/dev/null 2>'" + err_file.string() + "'";
    const int status = std::system(cmd.c_str());
    err = slurp(err_file);
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

}  // namespace

TEST_CASE("tessera run stops with exit code 2, keeps its outputs and a checkpoint below the limit; resume says the same") {
    const fs::path dir = fs::temp_directory_path() / ("tessera-cell-limit-test-" + std::to_string(::getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    const fs::path scenario = dir / "unbounded.toml";
    std::ofstream(scenario) << unbounded;
    const fs::path out = dir / "out";
    std::string err;
    REQUIRE(program("run '" + scenario.string() + "' --out '" + out.string() + "' --quiet", dir / "err.txt", err) == 2);
    INFO(err);
    CHECK_THAT(err, Contains("error: " + scenario.string() + ": the population grows without bound: at t = 26."));
    CHECK_THAT(err, Contains("patch X=0, Y=0"));
    CHECK_THAT(err, Contains("trait [0, 4]"));
    CHECK_THAT(err, Contains("the limit of 2^62 (4.6e18) cells per patch"));
    CHECK_THAT(err, Contains("set rates.competition > 0 or lower run.until"));
    CHECK_THAT(err, Contains("a checkpoint of that state are in " + out.string() + "/"));

    // The series up to the stop, flushed; the checkpoint holds that state, below the limit.
    const std::string series = slurp(out / "series.csv");
    CHECK_THAT(series, Contains("\n0,26,"));
    const Checkpoint c = read_checkpoint(out / "checkpoint.bin");
    REQUIRE(c.replicates.size() == 1);
    const ReplicateCheckpoint& r = c.replicates[0];
    CHECK(r.stage == ReplicateCheckpoint::Stage::running);
    CHECK(r.state.time > 26.0);
    CHECK(r.outputs.series_bytes == series.size());
    int128 cells = 0;
    for (std::int64_t n : r.state.active) cells += n;
    for (std::int64_t n : r.state.dormant) cells += n;
    CHECK(cells > 0);
    CHECK(cells < static_cast<int128>(cell_limit));
    CHECK(fs::exists(out / "fields.h5"));

    // Resuming meets the same limit at once: exit 2, the same message, the files unchanged.
    std::string again;
    CHECK(program("resume '" + out.string() + "'", dir / "err2.txt", again) == 2);
    CHECK_THAT(again, Contains(err.substr(err.find(": the population"), 120)));
    CHECK(slurp(out / "series.csv") == series);
    std::error_code ec;
    if (!std::getenv("TESSERA_KEEP_TEST_FILES")) fs::remove_all(dir, ec);
}
#endif
