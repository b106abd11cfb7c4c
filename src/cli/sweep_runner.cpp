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
#include "cli/sweep_report.hpp"
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

// The full series of a replicate, as series.csv holds it (--keep-series).
struct SeriesText : Observer {
    std::string text;
    void observe(const Engine& engine, unsigned kinds) override {
        if (kinds & series_output) append_series_rows(engine, text);
    }
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

}  // namespace

std::vector<std::size_t> shard_points(std::size_t points, int shard_index, int shard_count) {
    std::vector<std::size_t> out;
    for (std::size_t i = static_cast<std::size_t>(shard_index - 1); i < points; i += static_cast<std::size_t>(shard_count))
        out.push_back(i);
    return out;
}

int run_sweep(const LoadedGrid& loaded, const SweepManifest& m, const fs::path& dir, const SweepRunOptions& options) {
    const std::vector<std::size_t> mine = shard_points(loaded.grid.size(), m.shard_index, m.shard_count);
    SweepState state;
    if (options.resume) {
        try {
            state = read_state(dir / state_name);
        } catch (const std::runtime_error& e) {
            std::cerr << "error: " << e.what() << "\n";
            return 2;
        }
        if (state.points_done > mine.size()) {
            std::cerr << "error: " << (dir / state_name).string() << ": records more points than the sweep has\n";
            return 2;
        }
        if (state.points_done == mine.size()) {
            if (!options.quiet) std::cout << dir.string() << ": the sweep is already finished; nothing to resume\n";
            return 0;
        }
    } else {
        std::string points = points_header(loaded.grid);
        for (std::size_t i : mine) points += points_row(loaded.grid, i);
        if (!write_text(dir / "points.csv", points)) {
            std::cerr << "error: cannot write " << (dir / "points.csv").string() << "\n";
            return 2;
        }
    }

    Table outcomes(dir / "outcomes.csv"), finals(dir / "final_exponents.csv"), summary(dir / "summary.csv");
    if (!outcomes.open(options.resume, outcomes_header(), state.outcomes_bytes) ||
        !finals.open(options.resume, final_exponents_header(), state.final_exponents_bytes) ||
        !summary.open(options.resume, summary_header(), state.summary_bytes))
        return 2;
    if (!options.resume) {
        state.outcomes_bytes = outcomes.bytes();
        state.final_exponents_bytes = finals.bytes();
        state.summary_bytes = summary.bytes();
        if (!write_state(dir / state_name, state)) {
            std::cerr << "error: cannot write " << (dir / state_name).string() << "\n";
            return 2;
        }
    }

    // This run's points: [first, mine.size()) of the shard.
    const std::size_t first = state.points_done;
    const std::size_t count = mine.size() - first;
    const int per_point = (m.with_limit ? 1 : 0) + (m.with_run ? m.replicates : 0);
    const std::size_t items = count * static_cast<std::size_t>(per_point);
    std::vector<std::unique_ptr<PointSlot>> slots(count);
    std::vector<Scenario> scenarios(count);
    for (std::size_t k = 0; k < count; ++k) {
        slots[k] = std::make_unique<PointSlot>();
        slots[k]->remaining = per_point;
        slots[k]->runs.resize(m.with_run ? static_cast<std::size_t>(m.replicates) : 0);
        if (m.keep_series) slots[k]->series.resize(slots[k]->runs.size());
        const std::size_t i = mine[first + k];
        scenarios[k] = loaded.scenarios[i];
        scenarios[k].seed = point_seed(m.seed.value_or(scenarios[k].seed), i);
    }

    RegimeSettings regimes;
    regimes.eps = m.eps;
    regimes.final_window = m.final_window;

    const int threads = options.threads > 0 ? options.threads : tbb::info::default_concurrency();
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    stop_requested = false;
    stop_signal = 0;
    std::signal(SIGINT, on_sweep_interrupt);
    std::signal(SIGTERM, on_sweep_interrupt);
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
        while (next_to_write < count && slots[next_to_write]->ready) {
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

    tessera::parallel_for(0, threads, [&](int) {
        for (;;) {
            const std::size_t item = next_item.fetch_add(1);
            if (item >= items || stop_requested) return;
            const std::size_t k = item / static_cast<std::size_t>(per_point);
            const int j = static_cast<int>(item % static_cast<std::size_t>(per_point)) - (m.with_limit ? 1 : 0);
            PointSlot& slot = *slots[k];
            try {
                if (j < 0) {
                    slot.limit = limit_point(scenarios[k], regimes);
                } else {
                    SeriesText text;
                    auto r = run_replicate(scenarios[k], j, regimes, &stop_requested, m.keep_series ? &text : nullptr);
                    if (!r) {
                        slot.failed = true;
                        continue;
                    }
                    slot.runs[static_cast<std::size_t>(j)] = std::move(r);
                    if (m.keep_series) slot.series[static_cast<std::size_t>(j)] = std::move(text.text);
                }
            } catch (const std::exception& e) {
                slot.failed = true;
                std::lock_guard lock(writer);
                if (failure.empty()) {
                    std::string where;
                    for (const std::string& a : loaded.grid.overrides(mine[first + k])) where += " " + a;
                    failure = "sweep point " + std::to_string(mine[first + k]) + " (" + where.substr(1) + "): " + e.what();
                }
                stop_requested = true;
                continue;
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
        }
    });
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
    std::signal(SIGINT, SIG_DFL);
    std::signal(SIGTERM, SIG_DFL);

    if (!failure.empty()) {
        std::cerr << "error: " << failure << "\n";
        if (next_to_write > 0 || first > 0)
            std::cerr << "the " << first + next_to_write << " points written so far are kept in " << dir.string() << "/\n";
        return 2;
    }
    if (next_to_write == count) {
        if (!options.quiet) print_sweep_report(dir, loaded.grid, std::cout);
        return 0;
    }
    const int signal = stop_signal.load();
    std::cerr << "\ninterrupted (" << (signal == SIGTERM ? "SIGTERM" : "SIGINT") << ") after " << first + next_to_write
              << " of " << mine.size() << " points; their rows are in " << dir.string()
              << "/\ncontinue with: tessera resume " << dir.string() << "\n";
    return 128 + (signal ? signal : SIGINT);
}

}  // namespace tessera::cli
