#include "cli/run_session.hpp"

#include <tbb/global_control.h>
#include <tbb/info.h>

#include <atomic>
#include <chrono>
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>
#include <mutex>
#include <regex>
#include <system_error>

#include "cli/checkpoint_keeper.hpp"
#include "cli/csv_output.hpp"
#include "cli/output_directory.hpp"
#include "cli/predict_models.hpp"
#include "cli/progress.hpp"
#include "cli/run_ensemble.hpp"
#include "cli/stop_signals.hpp"
#include "cluster/cluster.hpp"
#include "core/count_limit.hpp"
#include "core/engine.hpp"
#include "core/parallel.hpp"
#include "io/fields_writer.hpp"
#include "io/scenario_writer.hpp"
#include "io/series_writer.hpp"
#include "render/frame_recorder.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

using Stage = ReplicateCheckpoint::Stage;

std::atomic<bool> interrupted{false};  // a signal came, or a replicate failed: stop after the step
std::atomic<int> interrupt_signal{0};

extern "C" void on_interrupt(int signal) {
    // The second Ctrl-C leaves at once. Files already written stay valid: checkpoint.bin is
    // only ever replaced by rename, and outputs written after it are cut back on resume.
    if (interrupted.exchange(true)) std::_Exit(128 + signal);
    interrupt_signal = signal;
}

// SIGINT, SIGTERM and SIGUSR1 stop the run at a step boundary with a checkpoint
// (cli/stop_signals.hpp).
void catch_stop_signals(bool on) { cli::catch_stop_signals(on ? on_interrupt : nullptr); }

// One replicate's outputs, written as the run goes and flushed after every output time, so a
// long run can be read while it runs. After an output time, once checkpoint_every seconds of
// wall time have passed since the last one, it hands a checkpoint section to the keeper.
class ReplicateOutputs : public Observer {
public:
    ReplicateOutputs(int replicate, CsvOutput& series, CsvOutput& habitat_series, std::unique_ptr<FieldsWriter> fields,
                     std::unique_ptr<FrameRecorder> frames, Progress& progress, CheckpointKeeper& keeper,
                     double checkpoint_every)
        : r_(replicate), series_(series), habitat_series_(habitat_series), fields_(std::move(fields)),
          frames_(std::move(frames)), progress_(progress), keeper_(keeper), every_(checkpoint_every),
          last_(std::chrono::steady_clock::now()) {}

    void observe(const Engine& engine, unsigned kinds) override {
        if (kinds & series_output) {
            buffer_.clear();
            append_series_rows(engine, buffer_);
            series_.write(r_, buffer_);
            buffer_.clear();
            append_habitat_series_rows(engine, buffer_);
            habitat_series_.write(r_, buffer_);
        }
        if ((kinds & fields_output) && fields_) fields_->append(engine);
        if ((kinds & frames_output) && frames_) frames_->observe(engine, kinds);
        progress_.report(r_, engine.time() / engine.until());
        const auto now = std::chrono::steady_clock::now();
        if (every_ > 0 && std::chrono::duration<double>(now - last_).count() >= every_) checkpoint(engine, Stage::running);
    }

    // Makes every output durable, then records the state and the output positions.
    void checkpoint(const Engine& engine, Stage stage) {
        ReplicateCheckpoint c;
        c.replicate = static_cast<std::uint32_t>(r_);
        c.stage = stage;
        c.state = engine.state();
        c.outputs.series_bytes = series_.sync(r_);
        c.outputs.habitat_series_bytes = habitat_series_.sync(r_);
        if (fields_) {
            fields_->sync();
            c.outputs.snapshots = fields_->snapshots();
        }
        if (frames_) c.outputs.frames = frames_->frames();
        keeper_.update(r_, encode_replicate(c));
        last_ = std::chrono::steady_clock::now();
    }

private:
    int r_;
    CsvOutput& series_;
    CsvOutput& habitat_series_;
    std::unique_ptr<FieldsWriter> fields_;
    std::unique_ptr<FrameRecorder> frames_;  // replicate 0 only, when output.frames_every > 0
    Progress& progress_;
    CheckpointKeeper& keeper_;
    double every_;
    std::chrono::steady_clock::time_point last_;
    std::string buffer_;
};

// Removes frames/frame_NNNNNN.png numbered `from` or later (written after a checkpoint, or
// by an earlier run in an overwritten directory).
void remove_frames_from(const fs::path& dir, std::uint64_t from) {
    std::error_code ec;
    if (!fs::is_directory(dir, ec)) return;
    static const std::regex name("frame_([0-9]{6,})\\.png");
    std::vector<fs::path> doomed;
    for (const auto& entry : fs::directory_iterator(dir, ec)) {
        std::smatch m;
        const std::string file = entry.path().filename().string();
        if (std::regex_match(file, m, name) && std::stoull(m[1].str()) >= from) doomed.push_back(entry.path());
    }
    for (const fs::path& p : doomed) fs::remove(p, ec);
}

std::string fields_name(int r) { return r == 0 ? "fields.h5" : "fields.replicate" + std::to_string(r) + ".h5"; }

// --- runs split over MPI ranks (docs/guide.md "Running on a cluster") ----------------------
// Rank 0 runs the session below and writes every file; the other ranks follow(): they step
// their bands of each replicate in turn and write nothing. Replicates run one after another,
// each over all ranks. Every rank decides the same from the same scenario and checkpoint;
// what only rank 0 can see (its files) it broadcasts: whether to start, and the exit code.

class NoOutputs : public Observer {
public:
    void observe(const Engine&, unsigned) override {}
};

// Why this scenario cannot be split over the ranks, if it cannot (the same on every rank).
std::string cluster_refusal(const Scenario& scenario) {
    const int n = cluster::size();
    if (n <= 1) return {};
    if (scenario.method == Method::exact_spatial)
        return scenario.source_path + ": run.method = \"exact-spatial\" is one event queue over the whole lattice, "
               "serial by nature, so it cannot be split over " + std::to_string(n) +
               " MPI ranks: run it as one process (without mpirun, or -np 1), or choose run.method = \"exact\", "
               "\"leap\" or \"auto\"";
    if (scenario.height < n)
        return scenario.source_path + ": the lattice has " + std::to_string(scenario.height) +
               " rows, too few to give each of " + std::to_string(n) + " MPI ranks a band of rows: use at most " +
               std::to_string(scenario.height) + " ranks";
    return {};
}

// The bands of a run over the ranks (nothing for a plain process); the Engine takes it at
// construction, so that a rank other than 0 never holds more than its band.
std::unique_ptr<LatticePartition> partition_of(const Scenario& scenario) {
    return cluster::lattice_partition(scenario.height, scenario.boundary == Boundary::periodic);
}

int follow(const Scenario& scenario, const Checkpoint* from, const SessionOptions& options) {
    const int go = cluster::code_of_rank0(-1);
    if (go >= 0) return go;
    interrupted = false;
    interrupt_signal = 0;
    catch_stop_signals(true);
    const int R = from ? static_cast<int>(from->replicates.size()) : options.replicates;
    for (int r = 0; r < R; ++r) {
        const ReplicateCheckpoint* begin = from ? &from->replicates[static_cast<std::size_t>(r)] : nullptr;
        if (begin && begin->stage == Stage::finished) continue;
        const std::unique_ptr<LatticePartition> partition = partition_of(scenario);
        Engine engine(scenario, static_cast<std::uint32_t>(r), partition.get());
        const bool resumed = begin && begin->stage == Stage::running;
        if (resumed) engine.restore(begin->state);  // rank 0 reports a checkpoint that does not fit
        NoOutputs none;
        try {
            engine.run(none, &interrupted, resumed);
        } catch (const CellLimitError&) {
            interrupted = true;  // rank 0 reports it; the later replicates stop at once, as there
        }
    }
    catch_stop_signals(false);
    cluster::max_over_ranks(interrupt_signal.load());  // rank 0 names the signal any rank had
    return cluster::code_of_rank0(0);
}

int report(const Scenario& scenario, const fs::path& dir, CsvOutput& series, CsvOutput& habitat_series,
           const std::string& failure, const std::vector<char>& finished, const std::vector<double>& stopped_at,
           int limit_replicate, int R, const SessionOptions& options);

// The whole run, fresh (`from` empty) or resumed from a checkpoint.
int simulate(const Scenario& scenario, const fs::path& dir, const Checkpoint* from, const SessionOptions& options) {
    if (cluster::rank() != 0) return follow(scenario, from, options);
    const int threads = scenario.threads > 0 ? scenario.threads : tbb::info::default_concurrency();
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));

    const int R = from ? static_cast<int>(from->replicates.size()) : options.replicates;
    CsvOutput series(dir / "series.csv", series_header(), R);
    CsvOutput habitat_series(dir / "habitat_series.csv", habitat_series_header(), R);

    std::vector<ReplicateCheckpoint> start(static_cast<std::size_t>(R));
    std::vector<std::string> sections;
    bool all_finished = true;
    for (int r = 0; r < R; ++r) {
        ReplicateCheckpoint& c = start[static_cast<std::size_t>(r)];
        if (from) {
            c = from->replicates[static_cast<std::size_t>(r)];
        } else {
            c.replicate = static_cast<std::uint32_t>(r);
            c.outputs.series_bytes = series.initial_bytes();
            c.outputs.habitat_series_bytes = habitat_series.initial_bytes();
        }
        all_finished = all_finished && c.stage == Stage::finished;
        sections.push_back(encode_replicate(c));
    }

    if (from && all_finished) {
        // Every replicate finished; only the join of the part files may be left to do.
        if (R == 1 || !series.parts_exist() || !habitat_series.parts_exist()) {
            if (!options.quiet) std::cout << dir.string() << ": the run is already finished; nothing to resume\n";
            return cluster::code_of_rank0(0);
        }
    }

    std::vector<std::uint64_t> series_bytes, habitat_bytes;
    for (const ReplicateCheckpoint& c : start) {
        series_bytes.push_back(c.outputs.series_bytes);
        habitat_bytes.push_back(c.outputs.habitat_series_bytes);
    }
    const bool opened = from ? series.reopen(series_bytes) && habitat_series.reopen(habitat_bytes)
                             : series.open() && habitat_series.open();
    if (!opened) return cluster::code_of_rank0(2);

    CheckpointKeeper keeper(dir / "checkpoint.bin", from ? from->scenario_text : resolved_scenario_toml(scenario),
                            scenario.habitat_of_patch, std::move(sections));
    try {
        if (!from) keeper.write();  // from the start, a kill -9 can be resumed
    } catch (const std::runtime_error& e) {
        std::cerr << "error: " << e.what() << "\n";
        return cluster::code_of_rank0(2);
    }
    cluster::code_of_rank0(-1);  // the other ranks start

    interrupted = false;
    interrupt_signal = 0;
    catch_stop_signals(true);

    Progress progress(R, !options.quiet && Progress::stderr_is_terminal());
    std::mutex failure_mutex;
    std::string failure;
    std::vector<char> finished(static_cast<std::size_t>(R), 0);
    std::vector<double> stopped_at(static_cast<std::size_t>(R), 0.0);  // in run.time_unit
    int limit_replicate = -1;  // the replicate stopped by the cell limit (under failure_mutex)
    // tessera::parallel_for, so that a TSan build sees the fork and join (core/parallel.hpp).
    const auto replicate = [&](int r) {
        const ReplicateCheckpoint& begin = start[static_cast<std::size_t>(r)];
        if (begin.stage == Stage::finished) {
            finished[static_cast<std::size_t>(r)] = 1;
            progress.report(r, 1.0);
            return;
        }
        try {
            const std::unique_ptr<LatticePartition> partition = partition_of(scenario);
            Engine engine(scenario, static_cast<std::uint32_t>(r), partition.get());
            const bool resumed = begin.stage == Stage::running;
            if (resumed) {
                try {
                    engine.restore(begin.state);
                } catch (const std::invalid_argument& e) {
                    throw std::runtime_error((dir / "checkpoint.bin").string() + ": replicate " + std::to_string(r) +
                                             ": " + e.what() + "; the file cannot be used");
                }
            }
            std::unique_ptr<FieldsWriter> fields;
            if (scenario.fields_every > 0) {
                const std::string path = (dir / fields_name(r)).string();
                fields = resumed ? FieldsWriter::rebuild(path, engine, begin.outputs.snapshots)
                                 : std::make_unique<FieldsWriter>(path, engine);
            }
            std::unique_ptr<FrameRecorder> frames;
            if (r == 0 && scenario.frames_every > 0) {
                const std::uint64_t first = resumed ? begin.outputs.frames : 0;
                remove_frames_from(dir / "frames", first);
                frames = std::make_unique<FrameRecorder>(dir / "frames", scenario.frame_scale);
                frames->resume_at(first);
            }
            ReplicateOutputs outputs(r, series, habitat_series, std::move(fields), std::move(frames), progress, keeper,
                                     scenario.checkpoint_every);
            try {
                engine.run(outputs, &interrupted, resumed);
            } catch (const CellLimitError& e) {
                // Stopped at a step boundary below the limit: keep that state and every output.
                outputs.checkpoint(engine, Stage::running);
                stopped_at[static_cast<std::size_t>(r)] =
                    scenario.time_unit == TimeUnit::logK ? engine.time_logK() : engine.time();
                std::lock_guard lock(failure_mutex);
                if (failure.empty()) {
                    failure = e.what();
                    limit_replicate = r;
                }
                interrupted = true;  // stop the other replicates too
                return;
            }
            const bool done = engine.time() >= engine.until();
            outputs.checkpoint(engine, done ? Stage::finished : Stage::running);
            finished[static_cast<std::size_t>(r)] = done ? 1 : 0;
            stopped_at[static_cast<std::size_t>(r)] =
                scenario.time_unit == TimeUnit::logK ? engine.time_logK() : engine.time();
        } catch (const std::exception& e) {
            if (cluster::size() > 1) {
                // The other ranks cannot see this (a file of rank 0's): end them too.
                std::cerr << "error: " << e.what() << "\n";
                cluster::stop_all(2);
            }
            std::lock_guard lock(failure_mutex);
            if (failure.empty()) failure = e.what();
            interrupted = true;  // stop the other replicates too
        }
    };
    if (cluster::active()) {
        for (int r = 0; r < R; ++r) replicate(r);  // each over every rank, in turn
    } else {
        tessera::parallel_for(0, R, replicate);
    }
    progress.finish();
    // A stop agreed by every rank may come from a signal to another rank only.
    interrupt_signal = cluster::max_over_ranks(interrupt_signal.load());
    return cluster::code_of_rank0(report(scenario, dir, series, habitat_series, failure, finished, stopped_at,
                                         limit_replicate, R, options));
}

// The end of a session: the files joined, or what stopped it and how to continue.
int report(const Scenario& scenario, const fs::path& dir, CsvOutput& series, CsvOutput& habitat_series,
           const std::string& failure, const std::vector<char>& finished, const std::vector<double>& stopped_at,
           int limit_replicate, int R, const SessionOptions& options) {

    bool complete = failure.empty();
    for (char f : finished) complete = complete && f;
    if (complete) {
        catch_stop_signals(false);
        if (!series.finish() || !habitat_series.finish() || !write_run_ensemble(dir, scenario, R)) return 2;
        if (!options.quiet) std::cout << "outputs written to " << dir.string() << "/\n";
        return 0;
    }
    series.close();
    habitat_series.close();
    catch_stop_signals(false);
    if (!failure.empty()) {
        std::cerr << "error: " << failure << "\n";
        if (limit_replicate >= 0)
            std::cerr << (R > 1 ? "replicate " + std::to_string(limit_replicate) + " stopped at " : "stopped at ")
                      << (scenario.time_unit == TimeUnit::logK ? "t/lnK = " : "t = ")
                      << stopped_at[static_cast<std::size_t>(limit_replicate)]
                      << "; the outputs up to then"
                      << (R > 1 ? " (series in one .part file per replicate, as for an interrupted run)" : "")
                      << " and a checkpoint of that state are in " << dir.string() << "/\n";
        return 2;
    }
    const int signal = interrupt_signal.load();
    std::cerr << "\ninterrupted (" << stop_signal_name(signal) << ") at "
              << (scenario.time_unit == TimeUnit::logK ? "t/lnK = " : "t = ") << stopped_at[0]
              << (R > 1 ? " (replicate 0)" : "") << "; outputs and checkpoint are in " << dir.string()
              << "/\ncontinue with: tessera resume " << dir.string() << "\n";
    return stop_exit_code(signal);
}

}  // namespace

int run_session(const Scenario& scenario, const std::string& out_dir, const SessionOptions& options) {
    if (const std::string refusal = cluster_refusal(scenario); !refusal.empty()) {
        if (cluster::rank() == 0) std::cerr << "error: " << refusal << "\n";
        return 2;
    }
    const fs::path dir(out_dir);
    if (cluster::rank() == 0) {  // only rank 0 writes files
        if (!prepare_directory(dir, options.overwrite)) return cluster::code_of_rank0(2);
        if (!write_text(dir / "scenario.resolved.toml", resolved_scenario_toml(scenario))) {
            std::cerr << "error: cannot write " << (dir / "scenario.resolved.toml").string() << "\n";
            return cluster::code_of_rank0(2);
        }
        // One patch: the exponent limit beside the series.
        if (!write_limit_beside_run(scenario, dir)) return cluster::code_of_rank0(2);
    }
    return simulate(scenario, dir, nullptr, options);
}

int resume_session(const Scenario& scenario, const std::string& run_dir, const Checkpoint& checkpoint,
                   const SessionOptions& options) {
    if (const std::string refusal = cluster_refusal(scenario); !refusal.empty()) {
        if (cluster::rank() == 0) std::cerr << "error: " << refusal << "\n";
        return 2;
    }
    return simulate(scenario, fs::path(run_dir), &checkpoint, options);
}

}  // namespace tessera::cli
