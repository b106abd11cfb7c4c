// Sweep benchmarks (docs/performance.md "Studies: sweeps"): the built `tessera sweep` timed
// as a process, wall clock, so the figures include loading and checking every point and
// writing the tables, as a user sees them.
//
//   stochastic: maps/well-mixed at K = 1e4, 20 values of p x 20 replicates, --threads 1 and
//               --threads 2; reports both times and their ratio (the points are independent,
//               so the ratio should be what single runs get from a second core), and the
//               same for `tessera run --replicates 20` at one p, for comparison;
//   limit:      50 x 50 over (p, tau) of the same scenario (the default 9-trait grid), --with
//               limit; the target is under 30 s on 2 cores. Reported as skipped while the
//               exponent limit is the stub ("not built yet").
//
// Usage: bench_sweep [stochastic|limit|all]  (default all). Not part of ctest.
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <vector>

namespace fs = std::filesystem;

namespace {

struct Timed {
    int code = -1;
    double seconds = 0.0;
    std::string err;
};

Timed run(const std::vector<std::string>& args) {
    const fs::path err = fs::temp_directory_path() / ("bench-sweep-" + std::to_string(::getpid()) + ".err");
    const auto start = std::chrono::steady_clock::now();
    const pid_t pid = ::fork();
    if (pid == 0) {
        std::FILE* e = std::fopen(err.c_str(), "wb");
        ::dup2(fileno(e), 2);
        std::vector<char*> argv{const_cast<char*>(TESSERA_BINARY)};
        for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
        argv.push_back(nullptr);
        ::execv(TESSERA_BINARY, argv.data());
        std::_Exit(127);
    }
    int status = 0;
    ::waitpid(pid, &status, 0);
    Timed t;
    t.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    t.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    std::ifstream in(err);
    t.err.assign(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
    fs::remove(err);
    return t;
}

const std::string scenario = std::string(TESSERA_SOURCE_DIR) + "/maps/well-mixed/scenario.toml";

void stochastic(const fs::path& scratch) {
    double seconds[2] = {0, 0};
    for (int threads : {1, 2}) {
        const fs::path out = scratch / ("stochastic-" + std::to_string(threads));
        const Timed t = run({"sweep", scenario, "--vary", "rates.dormancy_probability=0:0.25:20", "--replicates", "20",
                             "--set", "scale.K=1e4", "--with", "run", "--threads", std::to_string(threads), "--quiet",
                             "--overwrite", "--out", out.string()});
        if (t.code != 0) {
            std::printf("stochastic sweep failed (exit %d): %s\n", t.code, t.err.c_str());
            return;
        }
        seconds[threads - 1] = t.seconds;
        std::printf("stochastic 20 points x 20 replicates, K = 1e4, %d thread%s: %.2f s\n", threads,
                    threads == 1 ? "" : "s", t.seconds);
    }
    std::printf("stochastic speed-up 1 -> 2 threads: %.2f\n", seconds[0] / seconds[1]);
    // The same work as replicates of one run (tessera run --replicates 20, at one p), for the
    // ratio single runs get from a second core on the machine as it is right now.
    double single[2] = {0, 0};
    for (int threads : {1, 2}) {
        const Timed t = run({"run", scenario, "--replicates", "20", "--set", "scale.K=1e4", "--set",
                             "rates.dormancy_probability=0.125", "--set", "output.fields_every=0", "--threads",
                             std::to_string(threads), "--quiet", "--overwrite", "--out",
                             (scratch / ("run-" + std::to_string(threads))).string()});
        if (t.code != 0) {
            std::printf("run --replicates 20 failed (exit %d): %s\n", t.code, t.err.c_str());
            return;
        }
        single[threads - 1] = t.seconds;
        std::printf("run --replicates 20, K = 1e4, %d thread%s: %.2f s\n", threads, threads == 1 ? "" : "s", t.seconds);
    }
    std::printf("run --replicates speed-up 1 -> 2 threads: %.2f\n", single[0] / single[1]);
}

void limit(const fs::path& scratch) {
    const Timed t = run({"sweep", scenario, "--vary", "rates.dormancy_probability=0:0.25:50", "--vary",
                         "rates.transfer=0:4:50", "--with", "limit", "--threads", "2", "--quiet", "--overwrite", "--out",
                         (scratch / "limit").string()});
    if (t.code == 2 && t.err.find("not built yet") != std::string::npos) {
        std::printf("limit 50 x 50: SKIPPED, the exponent limit is not built yet on this branch\n");
        return;
    }
    if (t.code != 0) {
        std::printf("limit sweep failed (exit %d): %s\n", t.code, t.err.c_str());
        return;
    }
    std::printf("limit 50 x 50 over (p, tau), 2 threads: %.2f s (target < 30 s)\n", t.seconds);
}

}  // namespace

int main(int argc, char** argv) {
    const std::string which = argc > 1 ? argv[1] : "all";
    const fs::path scratch = fs::temp_directory_path() / ("bench-sweep-" + std::to_string(::getpid()));
    fs::create_directories(scratch);
    if (which == "stochastic" || which == "all") stochastic(scratch);
    if (which == "limit" || which == "all") limit(scratch);
    fs::remove_all(scratch);
    return 0;
}
