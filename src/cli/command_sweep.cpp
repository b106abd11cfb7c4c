// tessera sweep: parse and check the whole grid (every point loaded as `tessera check` would
// load it) before anything runs, prepare the directory, record the manifest, run.
// `tessera resume DIR` on a sweep directory comes here too (resume_sweep).
#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/output_directory.hpp"
#include "cli/sweep_grid.hpp"
#include "cli/sweep_manifest.hpp"
#include "cli/sweep_runner.hpp"
#include "cluster/cluster.hpp"
#include "theory/exponent_limit.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

int merge_sweeps(const std::vector<std::string>& dirs, const std::string& out, bool overwrite, bool quiet);

namespace {

const std::vector<std::string> sweep_markers{manifest_name, "outcomes.csv", "series.csv", "checkpoint.bin"};

bool parse_shard(const std::string& text, int& index, int& count) {
    const std::size_t slash = text.find('/');
    if (slash == std::string::npos) return false;
    try {
        std::size_t a = 0, b = 0;
        index = std::stoi(text.substr(0, slash), &a);
        count = std::stoi(text.substr(slash + 1), &b);
        return a == slash && b == text.size() - slash - 1 && count >= 1 && index >= 1 && index <= count;
    } catch (const std::exception&) {
        return false;
    }
}

}  // namespace

int sweep_command(const SweepOptions& o) {
    if (!o.merge.empty()) {
        if (!o.scenario.empty() || !o.vary.empty()) {
            std::cerr << "error: --merge joins finished shards; it takes no SCENARIO and no --vary\n";
            return 2;
        }
        if (cluster::size() > 1) {
            std::cerr << "error: --merge only joins files, so it does not run under an MPI launcher ("
                      << cluster::size() << " ranks): run it as one plain process, without mpirun\n";
            return 2;
        }
        return merge_sweeps(o.merge, o.out, o.overwrite, o.quiet);
    }
    if (o.scenario.empty()) {
        std::cerr << "error: sweep: give a SCENARIO.toml (or --merge DIR... to join shards)\n";
        return 2;
    }
    if (o.out.empty()) {
        std::cerr << "error: sweep: --out DIR is required (the directory for points.csv, outcomes.csv, ...)\n";
        return 2;
    }
    if (!(o.eps > 0 && o.eps < 1)) {
        std::cerr << "error: --eps " << o.eps << ": expected a number between 0 and 1 (exclusive)\n";
        return 2;
    }
    if (!(o.final_window > 0 && o.final_window <= 1)) {
        std::cerr << "error: --final-window " << o.final_window << ": expected a fraction of the run, in (0, 1]\n";
        return 2;
    }
    SweepManifest m;
    std::error_code ec;
    m.scenario = fs::absolute(fs::path(o.scenario), ec).lexically_normal().string();
    m.sets = o.sets;
    m.vary = o.vary;
    m.replicates = o.replicates.value_or(10);
    m.seed = o.seed;
    m.keep_series = o.keep_series;
    m.eps = o.eps;
    m.final_window = o.final_window;
    if (!o.shard.empty() && !parse_shard(o.shard, m.shard_index, m.shard_count)) {
        std::cerr << "error: --shard " << o.shard << ": expected I/N with 1 <= I <= N, e.g. --shard 2/8\n";
        return 2;
    }

    const auto loaded = load_grid(o.scenario, o.sets, o.vary);
    if (!loaded) return 2;
    m.points = loaded->grid.size();
    m.checksum = loaded->checksum;

    // The limit applies to one patch only (and not to every scenario); say where it does not.
    std::optional<std::string> why_not;
    std::size_t where = 0;
    for (std::size_t i = 0; i < loaded->scenarios.size() && !why_not; ++i) {
        why_not = limit_not_applicable(loaded->scenarios[i]);
        where = i;
    }
    if (o.with.empty()) {
        m.with_limit = !why_not;
        m.with_run = true;
        if (why_not && !o.quiet)
            std::cerr << "note: runs only (--with run): the exponent limit does not apply: " << *why_not << "\n";
    } else {
        m.with_limit = o.with != "run";
        m.with_run = o.with != "limit";
        if (m.with_limit && why_not) {
            std::string values;
            for (const std::string& a : loaded->grid.overrides(where)) values += (values.empty() ? "" : ", ") + a;
            std::cerr << "error: --with " << o.with << ": the exponent limit does not apply at the sweep point " << where
                      << " (" << values << "): " << *why_not << "; use --with run\n";
            return 2;
        }
    }

    const fs::path dir(o.out);
    if (cluster::rank() == 0) {  // only rank 0 writes files
        if (!prepare_directory(dir, o.overwrite, sweep_markers)) return sweep_start_failed(2);
        std::error_code rm;
        fs::remove_all(dir / "points", rm);  // an overwritten sweep's kept series
        if (!write_manifest(dir / manifest_name, m)) {
            std::cerr << "error: cannot write " << (dir / manifest_name).string() << "\n";
            return sweep_start_failed(2);
        }
    }
    return run_sweep(*loaded, m, dir, {o.threads.value_or(0), o.quiet, false});
}

int resume_sweep(const std::string& run_dir, std::optional<int> threads, bool quiet) {
    const fs::path dir(run_dir);
    SweepManifest m;
    try {
        m = read_manifest(dir / manifest_name);
    } catch (const std::runtime_error& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    }
    const auto loaded = load_grid(m.scenario, m.sets, m.vary);
    if (!loaded) {
        std::cerr << "error: " << dir.string() << ": the sweep's scenario " << m.scenario
                  << " no longer loads with its --set and --vary; the sweep cannot be resumed\n";
        return 2;
    }
    if (loaded->grid.size() != m.points || loaded->checksum != m.checksum) {
        std::cerr << "error: " << dir.string() << ": the scenario " << m.scenario
                  << " (or its map) has changed since the sweep started, so its points would differ; restore it "
                     "to resume, or start a new sweep\n";
        return 2;
    }
    return run_sweep(*loaded, m, dir, {threads.value_or(0), quiet, true});
}

}  // namespace tessera::cli
