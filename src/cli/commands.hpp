// One function per subcommand; main.cpp only parses the command line and calls these.
// Each returns the process exit code: 0 success, 2 bad input or usage, 1 internal error.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace tessera::cli {

struct RunOptions {
    std::string scenario;
    std::string out;  // "" = <scenario name>-run in the current directory
    std::vector<std::string> sets;
    std::optional<std::uint64_t> seed;
    std::optional<int> threads;
    int replicates = 1;
    bool quiet = false;
    bool overwrite = false;
};

struct CheckOptions {
    std::string scenario;
    std::vector<std::string> sets;
};

struct DemoOptions {
    std::string program = "tessera";  // as the user typed it, for the commands the demo suggests
    std::string out = "tessera-demo";
    std::optional<int> threads;
    bool quiet = false;
};

struct ResumeOptions {
    std::string run_dir;
    std::optional<int> threads;
    bool quiet = false;
};

struct PredictOptions {
    std::string scenario;
    std::string model;  // "limit", "ode" or "" (limit for one patch, ode for a lattice)
    std::vector<std::string> sets;
    std::string out;  // "" = <scenario name>-predict in the current directory
    bool overwrite = false;
    bool quiet = false;
};

// tessera sweep (command_sweep*.cpp): a grid of scenarios from --vary axes, run and classified.
struct SweepOptions {
    std::string scenario;
    std::vector<std::string> vary;
    std::vector<std::string> sets;
    std::vector<std::string> merge;  // --merge DIR...: join shards instead of running
    std::string with;                // "limit", "run", "both" or "" (both where the limit applies, else run)
    std::optional<int> replicates;   // default 10
    std::optional<std::uint64_t> seed;
    std::optional<int> threads;
    std::string shard;  // "I/N", 1 <= I <= N; "" = the whole grid
    std::string out;
    double eps = 0.1;
    double final_window = 0.25;
    bool keep_series = false;
    bool overwrite = false;
    bool quiet = false;
};

int run_command(const RunOptions& options);
int sweep_command(const SweepOptions& options);
// `tessera resume DIR` on a sweep directory (one holding sweep.manifest).
int resume_sweep(const std::string& dir, std::optional<int> threads, bool quiet);
int predict_command(const PredictOptions& options);
int resume_command(const ResumeOptions& options);
int check_command(const CheckOptions& options);
int demo_command(const DemoOptions& options);

}  // namespace tessera::cli
