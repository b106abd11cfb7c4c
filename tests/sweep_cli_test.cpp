// `tessera sweep` as a process: bad --vary specifications are refused before anything is
// written (exit 2, naming the key); the tables do not depend on the thread count; shards
// merge to the bytes of the unsharded sweep; a sweep stopped after k points (test hook) or
// by a real SIGINT exits 130 and `tessera resume` finishes it byte-identically; a changed
// scenario is not resumed; --keep-series; `tessera run --replicates` writes ensemble.csv.
#include <catch2/catch.hpp>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <thread>
#include <vector>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using Catch::Matchers::Contains;

using namespace tessera;

namespace {

const std::string tool = TESSERA_BINARY;
using clitest::slurp;

fs::path scratch() {
    static const clitest::ScratchDir s("tessera-sweep-test");
    return s.path();
}

struct Result {
    int code = -1;
    std::string err;
};

// Starts the program with `args` (stderr to a file); `env` is added to its environment.
pid_t start(const std::vector<std::string>& args, const fs::path& err, const std::string& env = "") {
    const pid_t pid = ::fork();
    if (pid == 0) {
        std::FILE* e = std::fopen(err.c_str(), "wb");
        ::dup2(fileno(e), 2);
        std::FILE* o = std::fopen("/dev/null", "wb");
        ::dup2(fileno(o), 1);
        if (!env.empty()) ::putenv(const_cast<char*>(env.c_str()));
        std::vector<char*> argv{const_cast<char*>(tool.c_str())};
        for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
        argv.push_back(nullptr);
        ::execv(tool.c_str(), argv.data());
        std::_Exit(127);
    }
    return pid;
}

int wait_for(pid_t pid) {
    int status = 0;
    ::waitpid(pid, &status, 0);
    return WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
}

Result run(const std::vector<std::string>& args, const std::string& env = "") {
    static int n = 0;
    const fs::path err = scratch() / ("stderr-" + std::to_string(n++) + ".txt");
    Result r;
    r.code = wait_for(start(args, err, env));
    r.err = slurp(err);
    return r;
}

// A copy of the bundled well-mixed scenario, small enough for many runs.
fs::path scenario() {
    const fs::path file = scratch() / "mixed.toml";
    if (!fs::exists(file)) fs::copy_file(fs::path(TESSERA_SOURCE_DIR) / "maps/well-mixed/scenario.toml", file);
    return file;
}

std::vector<std::string> sweep_args(const fs::path& out, std::vector<std::string> extra = {}) {
    std::vector<std::string> a{"sweep", scenario().string(), "--vary", "rates.dormancy_probability=0:0.25:4",
                               "--vary", "rates.transfer=1,3", "--replicates", "3", "--set", "scale.K=400",
                               "--set", "run.until=6", "--quiet", "--out", out.string()};
    a.insert(a.end(), extra.begin(), extra.end());
    return a;
}

const std::vector<std::string> tables{"points.csv", "outcomes.csv", "final_exponents.csv", "summary.csv",
                                      "sweep.manifest", "sweep.state"};

void same_files(const fs::path& a, const fs::path& b) {
    for (const std::string& t : tables) {
        INFO(t << ": " << a.string() << " vs " << b.string());
        CHECK(slurp(a / t) == slurp(b / t));
    }
}

fs::path reference() {
    static const fs::path dir = [] {
        const fs::path d = scratch() / "reference";
        const Result r = run(sweep_args(d, {"--threads", "1"}));
        REQUIRE(r.code == 0);
        return d;
    }();
    return dir;
}

}  // namespace

TEST_CASE("sweep: bad --vary specifications exit 2 naming the key, before anything is written", "[sweep]") {
    struct Bad {
        std::string vary, says;
    };
    for (const Bad& b : {Bad{"rates.transfer=1:1:3", "--vary rates.transfer: empty range"},
                         Bad{"rates.transfer=0:1:0", "--vary rates.transfer: N '0'"},
                         Bad{"rates.tranfser=0:1:3", "--vary rates.tranfser=0: unknown key; did you mean rates.transfer"},
                         Bad{"rates.dormancy_probability=0:0.5:3", "--vary rates.dormancy_probability=0.5: p * x_max"},
                         Bad{"rates.transfer_form=0:1:2", "--vary rates.transfer_form=0: must be a string"},
                         Bad{"rates.transfer=", "--vary rates.transfer: no values"},
                         Bad{"scale.K=log:0:10:3", "--vary scale.K: a log range needs"}}) {
        const fs::path out = scratch() / "bad";
        const Result r = run({"sweep", scenario().string(), "--vary", b.vary, "--out", out.string(), "--quiet"});
        INFO(b.vary << "\n" << r.err);
        CHECK(r.code == 2);
        CHECK_THAT(r.err, Contains(b.says));
        CHECK_FALSE(fs::exists(out));
    }
    // The same key in --vary and --set, and a key varied twice.
    const fs::path out = scratch() / "bad";
    Result r = run({"sweep", scenario().string(), "--vary", "rates.transfer=1,2", "--set", "rates.transfer=3", "--out",
                    out.string()});
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Contains("--vary rates.transfer: the key is also given to --set"));
    r = run({"sweep", scenario().string(), "--vary", "rates.transfer=1,2", "--vary", "rates.transfer=3,4", "--out",
             out.string()});
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Contains("varied twice"));
    // The exponent limit is asked for where it does not apply (a lattice).
    r = run({"sweep", scenario().string(), "--vary", "rates.transfer=1,2", "--with", "limit", "--set",
             "lattice.width=2", "--out", out.string()});
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Contains("does not apply"));
    CHECK_FALSE(fs::exists(out / "outcomes.csv"));
}

TEST_CASE("sweep: the tables hold every point and do not depend on the thread count", "[sweep]") {
    const fs::path two = scratch() / "threads2";
    REQUIRE(run(sweep_args(two, {"--threads", "2"})).code == 0);
    same_files(reference(), two);
    const std::string outcomes = slurp(reference() / "outcomes.csv");
    CHECK(outcomes.rfind("point,source,replicate,regime,residents,period,final_t_logK\n", 0) == 0);
    // One patch: the limit (--with both is the default there) and 3 replicates per point.
    CHECK(std::count(outcomes.begin(), outcomes.end(), '\n') == 1 + 8 * (1 + 3));
    CHECK(slurp(reference() / "points.csv") ==
          "point,rates.dormancy_probability,rates.transfer\n0,0,1\n1,0,3\n2,0.0833333333333,1\n3,0.0833333333333,3\n"
          "4,0.166666666667,1\n5,0.166666666667,3\n6,0.25,1\n7,0.25,3\n");
    const std::string summary = slurp(reference() / "summary.csv");
    // 4 regimes + 9 traits per point and source (limit and run).
    CHECK(std::count(summary.begin(), summary.end(), '\n') == 1 + 8 * 2 * 13);
}

TEST_CASE("sweep: shards merge to the bytes of the unsharded sweep", "[sweep]") {
    std::vector<std::string> dirs;
    for (int i = 1; i <= 3; ++i) {
        const fs::path d = scratch() / ("shard" + std::to_string(i));
        REQUIRE(run(sweep_args(d, {"--shard", std::to_string(i) + "/3"})).code == 0);
        dirs.push_back(d.string());
    }
    const fs::path merged = scratch() / "merged";
    std::vector<std::string> args{"sweep", "--merge"};
    args.insert(args.end(), dirs.begin(), dirs.end());
    args.insert(args.end(), {"--out", merged.string(), "--quiet"});
    REQUIRE(run(args).code == 0);
    same_files(reference(), merged);
    // A missing shard is refused.
    const Result r = run({"sweep", "--merge", dirs[0], dirs[2], "--out", (scratch() / "merged-bad").string()});
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Contains("shard 2/3 is missing"));
}

TEST_CASE("sweep: stopped after k points, resumed, byte-identical", "[sweep]") {
    const fs::path d = scratch() / "stopped";
    const Result stopped = run(sweep_args(d, {"--threads", "2"}), "TESSERA_SWEEP_STOP_AFTER=3");
    CHECK(stopped.code == 130);
    CHECK_THAT(stopped.err, Contains("continue with: tessera resume"));
    // What is there is a prefix of the finished tables.
    for (const char* t : {"outcomes.csv", "final_exponents.csv", "summary.csv"}) {
        const std::string part = slurp(d / t), whole = slurp(reference() / t);
        CHECK(part.size() < whole.size());
        CHECK(whole.compare(0, part.size(), part) == 0);
    }
    REQUIRE(run({"resume", d.string(), "--quiet", "--threads", "1"}).code == 0);
    same_files(reference(), d);
    // A finished sweep has nothing left to resume.
    CHECK(run({"resume", d.string(), "--quiet"}).code == 0);
}

TEST_CASE("sweep: Ctrl-C keeps the finished points, exits 130, and resumes byte-identically", "[sweep]") {
    // Heavier points, so that the signal comes while points are running.
    const fs::path d = scratch() / "sigint", full = scratch() / "sigint-reference";
    const std::vector<std::string> heavy{"--set", "scale.K=3000", "--set", "run.until=8"};
    auto args = [&](const fs::path& out) {
        std::vector<std::string> a{"sweep", scenario().string(), "--vary", "rates.dormancy_probability=0:0.25:6",
                                   "--replicates", "2", "--quiet", "--threads", "1", "--out", out.string()};
        a.insert(a.end(), heavy.begin(), heavy.end());
        return a;
    };
    REQUIRE(run(args(full)).code == 0);
    const pid_t pid = start(args(d), scratch() / "sigint-stderr.txt");
    // Wait until the first point is written, then interrupt.
    const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
    while (std::chrono::steady_clock::now() < deadline) {
        if (slurp(d / "sweep.state").find("points_done=0") == std::string::npos && fs::exists(d / "sweep.state")) break;
        std::this_thread::sleep_for(std::chrono::milliseconds(5));
    }
    ::kill(pid, SIGINT);
    const int code = wait_for(pid);
    if (code == 0) {
        WARN("the sweep finished before SIGINT arrived; the interrupt was not exercised");
    } else {
        CHECK(code == 130);
        CHECK_THAT(slurp(scratch() / "sigint-stderr.txt"), Contains("interrupted (SIGINT)"));
        REQUIRE(run({"resume", d.string(), "--quiet"}).code == 0);
    }
    for (const char* t : {"outcomes.csv", "final_exponents.csv", "summary.csv", "points.csv"})
        CHECK(slurp(d / t) == slurp(full / t));
}

TEST_CASE("sweep: a scenario changed since the sweep started is not resumed", "[sweep]") {
    const fs::path file = scratch() / "changing.toml";
    fs::copy_file(scenario(), file, fs::copy_options::overwrite_existing);
    const fs::path d = scratch() / "changed";
    std::vector<std::string> a{"sweep", file.string(), "--vary", "rates.transfer=1,2,3", "--replicates", "2", "--set",
                               "scale.K=300", "--set", "run.until=4", "--quiet", "--out", d.string()};
    REQUIRE(run(a, "TESSERA_SWEEP_STOP_AFTER=1").code == 130);
    std::ofstream(file, std::ios::app) << "\n[scale]\nK = 500\n";  // a second [scale]: no longer loads
    Result r = run({"resume", d.string()});
    CHECK(r.code == 2);
    fs::copy_file(scenario(), file, fs::copy_options::overwrite_existing);
    std::string text = slurp(file);
    text.replace(text.find("death = 0.05"), 12, "death = 0.06");
    std::ofstream(file, std::ios::binary) << text;
    r = run({"resume", d.string()});
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Contains("has changed since the sweep started"));
}

TEST_CASE("sweep: --keep-series writes each point's series, and run --replicates writes ensemble.csv", "[sweep]") {
    const fs::path d = scratch() / "kept";
    REQUIRE(run({"sweep", scenario().string(), "--vary", "rates.transfer=1,2", "--replicates", "2", "--set",
                 "scale.K=300", "--set", "run.until=2", "--keep-series", "--quiet", "--out", d.string()})
                .code == 0);
    const std::string series = slurp(d / "points/0001/series.csv");
    CHECK(series.rfind("replicate,t,t_logK,dormancy,transfer,active,dormant,exponent,exponent_per_patch\n", 0) == 0);
    CHECK_THAT(series, Contains("\n1,"));  // both replicates
    CHECK(fs::exists(d / "points/0001/scenario.resolved.toml"));

    const fs::path r = scratch() / "ensemble-run";
    REQUIRE(run({"run", scenario().string(), "--replicates", "3", "--set", "scale.K=300", "--set", "run.until=2",
                 "--quiet", "--out", r.string()})
                .code == 0);
    const std::string ensemble = slurp(r / "ensemble.csv");
    CHECK(ensemble.rfind("t,t_logK,dormancy,transfer,replicates,present,exponent_mean,", 0) == 0);
    const std::string all = slurp(r / "series.csv");
    // One ensemble row per row of one replicate.
    CHECK(std::count(ensemble.begin(), ensemble.end(), '\n') - 1 == (std::count(all.begin(), all.end(), '\n') - 1) / 3);
    CHECK_THAT(ensemble, Contains("\n0,0,0,0,3,1,"));  // t = 0, trait (0,0), all 3 present
    // One replicate: no ensemble.
    const fs::path one = scratch() / "single-run";
    REQUIRE(run({"run", scenario().string(), "--set", "scale.K=300", "--set", "run.until=1", "--quiet", "--out",
                 one.string()})
                .code == 0);
    CHECK_FALSE(fs::exists(one / "ensemble.csv"));
}

TEST_CASE("sweep: replicate r of point i does not depend on how many replicates there are", "[sweep]") {
    const fs::path d = scratch() / "two-replicates";
    std::vector<std::string> a = sweep_args(d);
    for (std::size_t k = 0; k + 1 < a.size(); ++k) {
        if (a[k] == "--replicates") a[k + 1] = "2";
    }
    REQUIRE(run(a).code == 0);
    // The rows of replicates 0 and 1 in the 3-replicate sweep, in order, are the 2-replicate sweep's.
    auto rows_below = [](const std::string& text, int replicates) {
        std::string out;
        std::size_t pos = text.find('\n') + 1;
        while (pos < text.size()) {
            const std::size_t end = text.find('\n', pos);
            const std::string row = text.substr(pos, end + 1 - pos);
            const std::size_t c1 = row.find(','), c2 = row.find(',', c1 + 1);
            if (std::stoi(row.substr(c2 + 1)) < replicates) out += row;
            pos = end + 1;
        }
        return out;
    };
    for (const char* t : {"outcomes.csv", "final_exponents.csv"})
        CHECK(rows_below(slurp(d / t), 2) == rows_below(slurp(reference() / t), 2));
}
