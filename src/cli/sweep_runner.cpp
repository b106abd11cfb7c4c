#include "cli/sweep_runner.hpp"

#include <tbb/global_control.h>
#include <tbb/info.h>

#include <unistd.h>

#include <atomic>
#include <chrono>
#include <csignal>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <iostream>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

#include "cli/output_directory.hpp"
#include "cli/progress.hpp"
#include "cli/stop_signals.hpp"
#include "cli/sweep_ranks.hpp"
#include "cli/sweep_report.hpp"
#include "cli/sweep_task.hpp"
#include "cluster/cluster.hpp"
#include "core/count_limit.hpp"
#include "core/parallel.hpp"
#include "core/trait_grid.hpp"
#include "io/scenario_writer.hpp"
#include "io/series_writer.hpp"
#include "io/sweep_tables.hpp"
#include "study/sweep_point.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::atomic<bool> stop_requested{false};
std::atomic<int> stop_signal{0};

extern "C" void on_sweep_interrupt(int signal) {
    if (stop_requested.exchange(true)) std::_Exit(128 + signal);
    stop_signal = signal;
}

// A growing table of the sweep: appended and flushed point by point.
class Table {
public:
    Table(fs::path file) : file_(std::move(file)) {}
    ~Table() { close(); }
    // Fresh: creates the file with its header. Resumed: cuts it back to `bytes`.
    bool open(bool resume, const std::string& header, std::uint64_t bytes) {
        std::error_code ec;
        if (resume) {
            if (!fs::exists(file_, ec) || fs::file_size(file_, ec) < bytes) {
                std::cerr << "error: " << file_.string() << ": missing or shorter than sweep.state records ("
                          << bytes << " bytes); the sweep cannot be resumed\n";
                return false;
            }
            fs::resize_file(file_, bytes, ec);
            handle_ = ec ? nullptr : std::fopen(file_.c_str(), "ab");
        } else {
            handle_ = std::fopen(file_.c_str(), "wb");
            if (handle_) append(header);
        }
        if (!handle_) std::cerr << "error: " << file_.string() << ": cannot be opened: " << std::strerror(errno) << "\n";
        return handle_ != nullptr;
    }
    void append(const std::string& text) {
        if (std::fwrite(text.data(), 1, text.size(), handle_) != text.size() || std::fflush(handle_) != 0)
            throw std::runtime_error(file_.string() + ": cannot be written: " + std::strerror(errno));
    }
    std::uint64_t bytes() { return static_cast<std::uint64_t>(std::ftell(handle_)); }
    void sync() {
        if (handle_ && ::fsync(fileno(handle_)) != 0)
            throw std::runtime_error(file_.string() + ": cannot be written: " + std::strerror(errno));
    }
    void close() {
        if (handle_) std::fclose(handle_);
        handle_ = nullptr;
    }

private:
    fs::path file_;
    std::FILE* handle_ = nullptr;
};

struct PointSlot {
    std::atomic<int> remaining{0};
    std::atomic<int> done{0};
    std::atomic<bool> failed{false};
    std::optional<PointResult> limit;
    std::vector<std::optional<PointResult>> runs;
    std::vector<std::string> series;
    bool ready = false;  // under the writer's mutex
};

std::string point_folder(std::size_t point) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%04zu", point);
    return buf;
}

// The end of a run: the table of a finished sweep, or what stopped it and how to continue.
int finish_report(const fs::path& dir, const ParameterGrid& grid, const std::string& failure, std::size_t first,
                  std::size_t written, std::size_t count, std::size_t points, bool quiet) {
    if (!failure.empty()) {
        std::cerr << "error: " << failure << "\n";
        if (written > 0 || first > 0)
            std::cerr << "the " << first + written << " points written so far are kept in " << dir.string() << "/\n";
        return 2;
    }
    if (written == count) {
        if (!quiet) print_sweep_report(dir, grid, std::cout);
        return 0;
    }
    const int signal = stop_signal.load();
    std::cerr << "\ninterrupted (" << stop_signal_name(signal) << ") after " << first + written
              << " of " << points << " points; their rows are in " << dir.string()
              << "/\ncontinue with: tessera resume " << dir.string() << "\n";
    return stop_exit_code(signal);
}

}  // namespace

std::vector<std::size_t> shard_points(std::size_t points, int shard_index, int shard_count) {
    std::vector<std::size_t> out;
    for (std::size_t i = static_cast<std::size_t>(shard_index - 1); i < points; i += static_cast<std::size_t>(shard_count))
        out.push_back(i);
    return out;
}

int sweep_start_failed(int code) {
    if (cluster::size() > 1) {
        long long start[2] = {code, 0};
        cluster::share_from_rank0(start, 2);
    }
    return code;
}

int run_sweep(const LoadedGrid& loaded, const SweepManifest& m, const fs::path& dir, const SweepRunOptions& options) {
    const int threads = options.threads > 0 ? options.threads : tbb::info::default_concurrency();
    if (cluster::size() > 1 && cluster::rank() != 0) {
        long long start[2] = {-1, 0};  // rank 0's go (-1) or exit code, and the first point to run
        cluster::share_from_rank0(start, 2);
        if (start[0] >= 0) return static_cast<int>(start[0]);
        tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
        stop_requested = false;
        stop_signal = 0;
        catch_stop_signals(on_sweep_interrupt);
        const int code = follow_sweep(make_sweep_work(loaded, m, static_cast<std::size_t>(start[1])), threads,
                                      {&stop_requested, &stop_signal});
        catch_stop_signals(nullptr);
        return code;
    }
    const std::vector<std::size_t> mine = shard_points(loaded.grid.size(), m.shard_index, m.shard_count);
    SweepState state;
    if (options.resume) {
        try {
            state = read_state(dir / state_name);
        } catch (const std::runtime_error& e) {
            std::cerr << "error: " << e.what() << "\n";
            return sweep_start_failed(2);
        }
        if (state.points_done > mine.size()) {
            std::cerr << "error: " << (dir / state_name).string() << ": records more points than the sweep has\n";
            return sweep_start_failed(2);
        }
        if (state.points_done == mine.size()) {
            if (!options.quiet) std::cout << dir.string() << ": the sweep is already finished; nothing to resume\n";
            return sweep_start_failed(0);
        }
    } else {
        std::string points = points_header(loaded.grid);
        for (std::size_t i : mine) points += points_row(loaded.grid, i);
        if (!write_text(dir / "points.csv", points)) {
            std::cerr << "error: cannot write " << (dir / "points.csv").string() << "\n";
            return sweep_start_failed(2);
        }
    }

    Table outcomes(dir / "outcomes.csv"), finals(dir / "final_exponents.csv"), summary(dir / "summary.csv");
    if (!outcomes.open(options.resume, outcomes_header(), state.outcomes_bytes) ||
        !finals.open(options.resume, final_exponents_header(), state.final_exponents_bytes) ||
        !summary.open(options.resume, summary_header(), state.summary_bytes))
        return sweep_start_failed(2);
    if (!options.resume) {
        state.outcomes_bytes = outcomes.bytes();
        state.final_exponents_bytes = finals.bytes();
        state.summary_bytes = summary.bytes();
        if (!write_state(dir / state_name, state)) {
            std::cerr << "error: cannot write " << (dir / state_name).string() << "\n";
            return sweep_start_failed(2);
        }
    }

    // This run's points: [first, mine.size()) of the shard.
    const std::size_t first = state.points_done;
    if (cluster::size() > 1) {  // the other ranks start
        long long start[2] = {-1, static_cast<long long>(first)};
        cluster::share_from_rank0(start, 2);
    }
    const SweepWork work = make_sweep_work(loaded, m, first);
    const std::size_t count = work.points.size();
    const int per_point = work.per_point;
    const std::size_t items = work.items();
    const std::vector<Scenario>& scenarios = work.scenarios;
    std::vector<std::unique_ptr<PointSlot>> slots(count);
    for (std::size_t k = 0; k < count; ++k) {
        slots[k] = std::make_unique<PointSlot>();
        slots[k]->remaining = per_point;
        slots[k]->runs.resize(m.with_run ? static_cast<std::size_t>(m.replicates) : 0);
        if (m.keep_series) slots[k]->series.resize(slots[k]->runs.size());
    }

    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    stop_requested = false;
    stop_signal = 0;
    catch_stop_signals(on_sweep_interrupt);
    std::size_t stop_after = 0;
    if (const char* hook = std::getenv("TESSERA_SWEEP_STOP_AFTER")) stop_after = std::strtoull(hook, nullptr, 10);

    Progress progress(static_cast<int>(count), !options.quiet && Progress::stderr_is_terminal());
    progress.show_count(static_cast<int>(mine.size()), "points");
    progress.count_done(static_cast<int>(first));
    std::mutex writer;
    std::size_t next_to_write = 0;  // index into slots
    std::string failure;
    std::atomic<std::size_t> next_item{0};
    auto last_sync = std::chrono::steady_clock::now();

    // Writes every ready point at the head of the buffer (caller holds `writer`).
    auto drain = [&]() {
        // The test hook stops the writing itself at its k-th point, so that the stopped
        // tables do not depend on which later points happened to be finished by then.
        while (next_to_write < count && slots[next_to_write]->ready && (stop_after == 0 || next_to_write < stop_after)) {
            PointSlot& slot = *slots[next_to_write];
            const std::size_t i = mine[first + next_to_write];
            const Scenario& s = scenarios[next_to_write];
            const TraitGrid traits(s.dormancy_axis, s.transfer_axis);
            const std::vector<std::string> names = trait_names(traits);
            std::string o, f, y;
            if (slot.limit) {
                append_outcome_row(o, i, "limit", 0, slot.limit->outcome, names);
                append_final_exponent_rows(f, i, "limit", 0, slot.limit->final_exponents, traits);
                append_summary_rows(y, i, "limit", summarize_outcomes({slot.limit->outcome}, names));
            }
            if (!slot.runs.empty()) {
                std::vector<Outcome> all;
                for (std::size_t r = 0; r < slot.runs.size(); ++r) {
                    append_outcome_row(o, i, "run", static_cast<int>(r), slot.runs[r]->outcome, names);
                    append_final_exponent_rows(f, i, "run", static_cast<int>(r), slot.runs[r]->final_exponents, traits);
                    all.push_back(slot.runs[r]->outcome);
                }
                append_summary_rows(y, i, "run", summarize_outcomes(all, names));
            }
            if (m.keep_series) {
                const fs::path folder = dir / "points" / point_folder(i);
                std::error_code ec;
                fs::create_directories(folder, ec);
                std::string text = series_header();
                for (const std::string& t : slot.series) text += t;
                if (ec || !write_text(folder / "series.csv", text) ||
                    !write_text(folder / "scenario.resolved.toml", resolved_scenario_toml(s)))
                    throw std::runtime_error((folder / "series.csv").string() + ": cannot be written");
            }
            outcomes.append(o);
            finals.append(f);
            summary.append(y);
            state.points_done = first + next_to_write + 1;
            state.outcomes_bytes = outcomes.bytes();
            state.final_exponents_bytes = finals.bytes();
            state.summary_bytes = summary.bytes();
            // fsync at most once a second: a sweep of quick points (the limit) would otherwise
            // spend its time waiting for the disk. A kill loses nothing either way (the page
            // cache survives it); a power cut loses at most the last second's points.
            const auto now = std::chrono::steady_clock::now();
            const bool sync = now - last_sync >= std::chrono::seconds(1) || first + next_to_write + 1 == mine.size();
            if (sync) {
                outcomes.sync();
                finals.sync();
                summary.sync();
                last_sync = now;
            }
            if (!write_state(dir / state_name, state, sync))
                throw std::runtime_error((dir / state_name).string() + ": cannot be written");
            slots[next_to_write].reset(new PointSlot());  // free the results
            ++next_to_write;
            progress.count_done(static_cast<int>(first + next_to_write));
            if (stop_after > 0 && next_to_write == stop_after && next_to_write < count) {
                stop_signal = SIGINT;
                stop_requested = true;
            }
        }
    };

    // One task's outcome, from this process's threads or (under MPI) from another rank.
    auto deliver = [&](TaskOutcome&& o) {
        if (!o.error.empty()) {
            std::lock_guard lock(writer);
            if (o.item < items) slots[work.point_of(o.item)]->failed = true;
            if (failure.empty()) {
                if (o.item < items) {
                    const std::size_t i = work.points[work.point_of(o.item)];
                    std::string where;
                    for (const std::string& a : loaded.grid.overrides(i)) where += " " + a;
                    failure = "sweep point " + std::to_string(i) + " (" + where.substr(1) + "): " + o.error;
                } else {
                    failure = o.error;
                }
            }
            stop_requested = true;
            return;
        }
        const std::size_t k = work.point_of(o.item);
        const int j = work.replicate_of(o.item);
        PointSlot& slot = *slots[k];
        if (!o.result) {  // stopped before its end
            slot.failed = true;
            return;
        }
        if (j < 0) {
            slot.limit = std::move(o.result);
        } else {
            slot.runs[static_cast<std::size_t>(j)] = std::move(o.result);
            if (m.keep_series) slot.series[static_cast<std::size_t>(j)] = std::move(o.series);
        }
        progress.report(static_cast<int>(k), static_cast<double>(slot.done.fetch_add(1) + 1) / per_point);
        if (slot.remaining.fetch_sub(1) == 1 && !slot.failed) {
            std::lock_guard lock(writer);
            slot.ready = true;
            try {
                drain();
            } catch (const std::exception& e) {
                if (failure.empty()) failure = e.what();
                stop_requested = true;
            }
        }
    };
    // This process's threads, taking tasks in order from next_item.
    auto local = [&] {
        tessera::parallel_for(0, threads, [&](int) {
            for (;;) {
                const std::size_t item = next_item.fetch_add(1);
                if (item >= items || stop_requested) return;
                deliver(run_sweep_task(work, item, &stop_requested));
            }
        });
    };
    std::optional<SweepLead> lead;
    if (cluster::size() > 1) {
        lead.emplace();
        lead->run(items, next_item, local, deliver, {&stop_requested, &stop_signal});
    } else {
        local();
    }
    progress.finish();
    try {
        outcomes.sync();
        finals.sync();
        summary.sync();
        write_state(dir / state_name, state, true);
    } catch (const std::exception&) {
        // The state already written stays valid: it never names bytes that were not written.
    }
    outcomes.close();
    finals.close();
    summary.close();
    catch_stop_signals(nullptr);

    const int code = finish_report(dir, loaded.grid, failure, first, next_to_write, count, mine.size(), options.quiet);
    if (lead) lead->end(code);
    return code;
}

}  // namespace tessera::cli
