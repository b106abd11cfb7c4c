// The whole program under interruption (docs/reliability.md): `tessera run` is started as a
// real process, stopped by SIGINT, SIGTERM, two SIGINTs or kill -9, continued with
// `tessera resume`, and its finished outputs (series.csv, habitat_series.csv, fields.h5,
// frames) must equal an uninterrupted run's byte for byte. Also: bad checkpoints are refused
// with exit 2, outputs are never clobbered, and unwritable or full outputs stop the run.
#include <catch2/catch.hpp>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <map>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "cli_support.hpp"
#include "io/checkpoint.hpp"

namespace fs = std::filesystem;
using namespace tessera;
using Catch::Matchers::Contains;

namespace {

const std::string tool = TESSERA_BINARY;
using clitest::exit_code;
using clitest::slurp;
using clitest::spit;

fs::path scratch() {
    static const clitest::ScratchDir s("tessera-resume-test");
    return s.path();
}

int program(const std::string& args, std::string* err = nullptr) {
    return clitest::run_program(tool, args, scratch(), nullptr, err);
}

// A small lattice with migration, a stressed patch and a stress pulse: every kind of state.
// `until` in plain time; sized so that a run lasts long enough to be interrupted.
fs::path scenario(const std::string& name, const std::string& method, double K, double until,
                  const std::string& extra = "") {
    std::ostringstream s;
    s << "title = \"resume test\"\n"
      << "[rates]\ntransfer = 3.0\nmigration = 0.3\nmigration_dormant = 0.05\nmutation_exponent = 0.3\n"
      << "[scale]\nK = " << K << "\n"
      << "[lattice]\nwidth = 4\nheight = 3\nboundary = \"absorbing\"\n"
      << "[[habitat]]\nname = \"open\"\n"
      << "[[schedule]]\nhabitat = \"open\"\nstart = 0.3\nend = 0.5\nevery = 0.6\nstress = 2.0\n"
      << "[run]\ntime_unit = \"plain\"\nsync = 0.01\nseed = 11\nuntil = " << until << "\nmethod = \"" << method
      << "\"\n"
      << "[output]\nevery = 0.05\nfields_every = 0.25\n"
      << extra;
    const fs::path file = scratch() / (name + ".toml");
    spit(file, s.str());
    return file;
}

// Runs the program to completion; its stderr is returned through `err`.

pid_t start(const std::vector<std::string>& args) {
    const pid_t pid = ::fork();
    if (pid == 0) {
        std::vector<char*> argv{const_cast<char*>(tool.c_str())};
        for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
        argv.push_back(nullptr);
        std::freopen("/dev/null", "w", stdout);
        std::freopen((scratch() / ("child-" + std::to_string(::getpid()) + ".err")).c_str(), "w", stderr);
        ::execv(tool.c_str(), argv.data());
        ::_exit(127);
    }
    return pid;
}

int finish(pid_t pid) {
    int status = 0;
    ::waitpid(pid, &status, 0);
    return exit_code(status);
}

// Waits until `file` holds at least `bytes` (the run is under way). False after 30 s.
bool wait_for_size(const fs::path& file, std::uintmax_t bytes) {
    const auto give_up = std::chrono::steady_clock::now() + std::chrono::seconds(30);
    while (std::chrono::steady_clock::now() < give_up) {
        std::error_code ec;
        if (fs::file_size(file, ec) >= bytes && !ec) return true;
        std::this_thread::sleep_for(std::chrono::milliseconds(2));
    }
    return false;
}

// Every output of a run directory (frames included).
std::map<std::string, std::string> outputs(const fs::path& dir) {
    std::map<std::string, std::string> files;
    for (const auto& e : fs::recursive_directory_iterator(dir)) {
        if (!e.is_regular_file() || e.path().filename() == "checkpoint.bin" ||
            e.path().filename() == "scenario.resolved.toml")  // records --threads and --set, which differ
            continue;
        files[fs::relative(e.path(), dir).string()] = slurp(e.path());
    }
    return files;
}

void require_same_outputs(const fs::path& a, const fs::path& b) {
    const auto x = outputs(a), y = outputs(b);
    std::vector<std::string> names_x, names_y;
    for (const auto& [k, v] : x) names_x.push_back(k);
    for (const auto& [k, v] : y) names_y.push_back(k);
    REQUIRE(names_x == names_y);
    for (const auto& [name, bytes] : x) {
        INFO(name);
        CHECK(bytes.size() == y.at(name).size());
        CHECK(bytes == y.at(name));  // byte for byte
    }
}

std::string reference(const fs::path& file, const std::string& extra_args = "") {
    const fs::path dir = scratch() / (file.stem().string() + "-reference");
    REQUIRE(program("run '" + file.string() + "' --quiet --overwrite --threads 1 --out '" + dir.string() + "' " + extra_args) == 0);
    return dir.string();
}

}  // namespace

TEST_CASE("Two uninterrupted runs give the same bytes, fields.h5 included", "[resume]") {
    const fs::path file = scenario("twice", "auto", 3e3, 1.0, "frames_every = 0.5\nframe_scale = 2\n");
    const std::string a = scratch() / "twice-a", b = scratch() / "twice-b";
    REQUIRE(program("run '" + file.string() + "' --quiet --threads 1 --out " + a) == 0);
    REQUIRE(program("run '" + file.string() + "' --quiet --threads 2 --out " + b) == 0);
    REQUIRE(fs::exists(fs::path(a) / "fields.h5"));
    REQUIRE(fs::exists(fs::path(a) / "frames" / "frame_000002.png"));
    require_same_outputs(a, b);
}

TEST_CASE("SIGINT finishes the step, checkpoints, exits 130; resume gives the uninterrupted bytes", "[resume]") {
    struct Case {
        const char* method;
        double K;
        double until;
    };
    // Sized to last about a second, so the signal comes mid-run.
    const Case c = GENERATE(Case{"exact", 150, 12}, Case{"leap", 1e6, 12}, Case{"auto", 3e3, 6},
                            Case{"exact-spatial", 100, 12});
    const int run_threads = GENERATE(1, 2);
    const int resume_threads = 3 - run_threads;
    CAPTURE(c.method, run_threads);
    const fs::path file = scenario(std::string("sigint-") + c.method, c.method, c.K, c.until);
    const std::string ref = reference(file);

    const fs::path dir = scratch() / (std::string("sigint-") + c.method + "-" + std::to_string(run_threads));
    fs::remove_all(dir);
    const pid_t pid = start({"run", file.string(), "--quiet", "--threads", std::to_string(run_threads), "--out",
                             dir.string()});
    REQUIRE(wait_for_size(dir / "series.csv", 4000));
    ::kill(pid, SIGINT);
    REQUIRE(finish(pid) == 130);
    const Checkpoint cp = read_checkpoint(dir / "checkpoint.bin");
    REQUIRE(cp.replicates[0].stage == ReplicateCheckpoint::Stage::running);
    CHECK(cp.replicates[0].outputs.series_bytes == fs::file_size(dir / "series.csv"));

    std::string err;
    REQUIRE(program("resume '" + dir.string() + "' --quiet --threads " + std::to_string(resume_threads), &err) == 0);
    INFO(err);
    require_same_outputs(ref, dir);
    // Resuming a finished run does nothing and says so.
    CHECK(program("resume '" + dir.string() + "'") == 0);
}

TEST_CASE("SIGTERM exits 143 and resumes; two SIGINTs leave at once and still resume", "[resume]") {
    const fs::path file = scenario("term", "auto", 3e3, 6, "frames_every = 0.5\nframe_scale = 2\n");
    const std::string ref = reference(file);

    const fs::path term = scratch() / "term-run";
    pid_t pid = start({"run", file.string(), "--quiet", "--out", term.string()});
    REQUIRE(wait_for_size(term / "series.csv", 4000));
    ::kill(pid, SIGTERM);
    REQUIRE(finish(pid) == 143);
    REQUIRE(program("resume '" + term.string() + "' --quiet") == 0);
    require_same_outputs(ref, term);

    const fs::path twice = scratch() / "twice-int-run";
    pid = start({"run", file.string(), "--quiet", "--out", twice.string(), "--set", "run.checkpoint_every=0.05"});
    REQUIRE(wait_for_size(twice / "series.csv", 4000));
    ::kill(pid, SIGINT);
    ::kill(pid, SIGINT);
    REQUIRE(finish(pid) == 130);
    REQUIRE(program("resume '" + twice.string() + "' --quiet") == 0);
    require_same_outputs(ref, twice);
}

TEST_CASE("kill -9 loses only the work since the last checkpoint", "[resume]") {
    // Two replicates (part files, a second fields file) and frames; checkpoints every 50 ms.
    const fs::path file = scenario("kill", "auto", 3e3, 6, "frames_every = 0.5\nframe_scale = 2\n");
    const std::string ref = reference(file, "--replicates 2");

    const fs::path dir = scratch() / "kill-run";
    const pid_t pid = start({"run", file.string(), "--quiet", "--replicates", "2", "--threads", "2", "--out",
                             dir.string(), "--set", "run.checkpoint_every=0.05"});
    // Wait for a checkpoint beyond the start of replicate 0, then a little more output.
    const auto give_up = std::chrono::steady_clock::now() + std::chrono::seconds(30);
    double checkpoint_time = 0.0;
    while (checkpoint_time <= 0.5 && std::chrono::steady_clock::now() < give_up) {
        std::this_thread::sleep_for(std::chrono::milliseconds(5));
        try {
            const Checkpoint cp = read_checkpoint(dir / "checkpoint.bin");
            checkpoint_time = cp.replicates[0].state.time;
        } catch (const CheckpointError&) {
        }
    }
    REQUIRE(checkpoint_time > 0.5);
    std::this_thread::sleep_for(std::chrono::milliseconds(30));
    ::kill(pid, SIGKILL);
    REQUIRE(finish(pid) == 128 + SIGKILL);
    const Checkpoint cp = read_checkpoint(dir / "checkpoint.bin");
    // Outputs went on past the checkpoint: resume must cut them back.
    CHECK(fs::file_size(dir / "series.replicate0.part") >= cp.replicates[0].outputs.series_bytes);

    std::string err;
    REQUIRE(program("resume '" + dir.string() + "' --quiet --threads 1", &err) == 0);
    INFO(err);
    require_same_outputs(ref, dir);
}

TEST_CASE("A damaged, truncated, foreign or newer checkpoint is refused with exit 2", "[resume]") {
    const fs::path file = scenario("bad", "exact", 150, 0.5);
    const fs::path dir = reference(file);
    const std::string good = slurp(fs::path(dir) / "checkpoint.bin");
    const fs::path bad = scratch() / "bad-copy";
    fs::remove_all(bad);
    fs::copy(dir, bad, fs::copy_options::recursive);
    const std::string name = (bad / "checkpoint.bin").string();
    auto refused = [&](const std::string& bytes) {
        spit(bad / "checkpoint.bin", bytes);
        std::string err;
        const int code = program("resume '" + bad.string() + "'", &err);
        CHECK(code == 2);
        CHECK_THAT(err, Contains(name));
        return err;
    };
    std::string flipped = good;
    flipped[flipped.size() / 3] ^= 1;
    CHECK_THAT(refused(flipped), Contains("corrupted"));
    CHECK_THAT(refused(good.substr(0, good.size() / 2)), Contains("truncated"));
    CHECK_THAT(refused("[run]\nuntil = 3\n"), Contains("not a tessera checkpoint"));
    std::string newer = good;
    newer[8] = 2;
    CHECK_THAT(refused(newer), Contains("format version 2"));
    fs::remove(bad / "checkpoint.bin");
    CHECK_THAT(refused(""), Contains("not a tessera checkpoint"));
    fs::remove(bad / "checkpoint.bin");
    std::string err;
    CHECK(program("resume '" + bad.string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("cannot open"));
}

TEST_CASE("An output shorter than its checkpoint says is refused, not continued", "[resume]") {
    const fs::path file = scenario("short", "exact", 150, 0.5);
    const fs::path dir = scratch() / "short-run";
    const pid_t pid = start({"run", file.string(), "--quiet", "--out", dir.string()});
    REQUIRE(finish(pid) == 0);
    // Pretend the run stopped half way, then lose part of series.csv.
    Checkpoint cp = read_checkpoint(dir / "checkpoint.bin");
    cp.replicates[0].stage = ReplicateCheckpoint::Stage::running;
    spit(dir / "checkpoint.bin", encode_checkpoint(cp.scenario_text, cp.habitat_of_patch,
                                                   {encode_replicate(cp.replicates[0])}));
    fs::resize_file(dir / "series.csv", cp.replicates[0].outputs.series_bytes - 10);
    std::string err;
    CHECK(program("resume '" + dir.string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("series.csv") && Contains("cannot resume"));
}

TEST_CASE("Outputs are never clobbered, and unwritable or full outputs stop before simulating", "[resume]") {
    const fs::path file = scenario("guard", "exact", 150, 0.5);
    const fs::path dir = scratch() / "guard-run";
    fs::remove_all(dir);
    fs::create_directories(dir);
    spit(dir / "checkpoint.bin", "x");  // a checkpoint alone marks a run
    std::string err;
    CHECK(program("run '" + file.string() + "' --out '" + dir.string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("already holds a run"));
    CHECK(slurp(dir / "checkpoint.bin") == "x");
    CHECK(program("run '" + file.string() + "' --quiet --overwrite --out '" + dir.string() + "'") == 0);
    CHECK_NOTHROW(read_checkpoint(dir / "checkpoint.bin"));

    // Tests may run as root, where permissions do not stop writes: use places no one can write.
    CHECK(program("run '" + file.string() + "' --out /proc/tessera-cannot-be-here", &err) == 2);
    CHECK_THAT(err, Contains("/proc/tessera-cannot-be-here"));
    CHECK(program("run '" + file.string() + "' --out '" + (file / "below-a-file").string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("below-a-file"));

    // A full disk: series.csv leads to /dev/full, which refuses every write with ENOSPC.
    const fs::path full = scratch() / "full-run";
    fs::remove_all(full);
    fs::create_directories(full);
    fs::create_symlink("/dev/full", full / "series.csv");
    CHECK(program("run '" + file.string() + "' --overwrite --out '" + full.string() + "'", &err) == 2);
    CHECK_THAT(err, Contains("series.csv") && Contains("No space left on device"));
}
