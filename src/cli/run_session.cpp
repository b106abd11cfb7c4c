#include "cli/run_session.hpp"

#include <tbb/global_control.h>
#include <tbb/info.h>
#include <tbb/parallel_for.h>

#include <atomic>
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>
#include <system_error>

#include "cli/progress.hpp"
#include "core/engine.hpp"
#include "io/scenario_writer.hpp"
#include "io/series_writer.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::atomic<bool> interrupted{false};
std::atomic<int> interrupt_signal{0};

extern "C" void on_interrupt(int signal) {
    if (interrupted.exchange(true)) std::_Exit(128 + signal);  // second Ctrl-C: leave at once
    interrupt_signal = signal;
}

// Writes one replicate's series rows as they come, flushing after every output time, so a
// long run can be read while it runs and an interrupted one keeps what it had.
class SeriesObserver : public Observer {
public:
    SeriesObserver(std::FILE* file, Progress& progress, int part)
        : file_(file), progress_(progress), part_(part) {}
    void observe(const Engine& engine, unsigned kinds) override {
        if (kinds & series_output) {
            buffer_.clear();
            append_series_rows(engine, buffer_);
            std::fwrite(buffer_.data(), 1, buffer_.size(), file_);
            std::fflush(file_);
        }
        progress_.report(part_, engine.time() / engine.until());
    }

private:
    std::FILE* file_;
    Progress& progress_;
    int part_;
    std::string buffer_;
};

bool holds_a_run(const fs::path& dir) {
    return fs::exists(dir / "series.csv") || fs::exists(dir / "scenario.resolved.toml");
}

// Creates the directory and proves it writable before any simulation starts.
bool prepare_directory(const fs::path& dir, bool overwrite) {
    std::error_code ec;
    if (fs::exists(dir, ec) && !fs::is_directory(dir, ec)) {
        std::cerr << "error: --out " << dir.string() << ": exists and is not a directory\n";
        return false;
    }
    if (holds_a_run(dir) && !overwrite) {
        std::cerr << "error: --out " << dir.string()
                  << ": already holds a run (series.csv); choose another directory or add --overwrite\n";
        return false;
    }
    fs::create_directories(dir, ec);
    if (ec) {
        std::cerr << "error: --out " << dir.string() << ": cannot create the directory: " << ec.message() << "\n";
        return false;
    }
    const fs::path probe = dir / ".tessera-write-test";
    std::ofstream test(probe);
    if (!(test << "ok")) {
        std::cerr << "error: --out " << dir.string() << ": the directory is not writable\n";
        return false;
    }
    test.close();
    fs::remove(probe, ec);
    return true;
}

bool write_text(const fs::path& file, const std::string& text) {
    std::ofstream out(file, std::ios::binary);
    out << text;
    out.close();
    return static_cast<bool>(out);
}

// Appends `part` to `into` and removes it.
bool append_and_remove(std::FILE* into, const fs::path& part) {
    std::FILE* in = std::fopen(part.c_str(), "rb");
    if (!in) return false;
    char buf[1 << 16];
    std::size_t n;
    bool ok = true;
    while ((n = std::fread(buf, 1, sizeof buf, in)) > 0) ok = ok && std::fwrite(buf, 1, n, into) == n;
    std::fclose(in);
    std::error_code ec;
    fs::remove(part, ec);
    return ok;
}

}  // namespace

int run_session(const Scenario& scenario, const std::string& out_dir, const SessionOptions& options) {
    const fs::path dir(out_dir);
    if (!prepare_directory(dir, options.overwrite)) return 2;
    if (!write_text(dir / "scenario.resolved.toml", resolved_scenario_toml(scenario))) {
        std::cerr << "error: cannot write " << (dir / "scenario.resolved.toml").string() << "\n";
        return 2;
    }

    const int threads = scenario.threads > 0 ? scenario.threads : tbb::info::default_concurrency();
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));

    interrupted = false;
    std::signal(SIGINT, on_interrupt);
    std::signal(SIGTERM, on_interrupt);

    const int R = options.replicates;
    // One replicate streams straight into series.csv; several stream into one part file
    // each, joined in replicate order at the end, so the file never depends on scheduling.
    const fs::path series = dir / "series.csv";
    std::vector<fs::path> files;
    if (R == 1) {
        files.push_back(series);
    } else {
        for (int r = 0; r < R; ++r) files.push_back(dir / ("series.replicate" + std::to_string(r) + ".part"));
    }
    std::vector<std::FILE*> handles;
    for (const fs::path& f : files) {
        std::FILE* h = std::fopen(f.c_str(), "wb");
        if (!h) {
            std::cerr << "error: cannot write " << f.string() << "\n";
            for (std::FILE* o : handles) std::fclose(o);
            return 2;
        }
        handles.push_back(h);
    }
    if (R == 1) std::fputs(series_header().c_str(), handles[0]);

    Progress progress(R, !options.quiet && Progress::stderr_is_terminal());
    tbb::parallel_for(0, R, [&](int r) {
        Engine engine(scenario, static_cast<std::uint32_t>(r));
        SeriesObserver observer(handles[static_cast<std::size_t>(r)], progress, r);
        engine.run(observer, &interrupted);
    });
    progress.finish();
    for (std::FILE* h : handles) std::fclose(h);

    if (R > 1) {
        std::FILE* all = std::fopen(series.c_str(), "wb");
        bool ok = all != nullptr;
        if (ok) ok = std::fputs(series_header().c_str(), all) >= 0;
        for (const fs::path& part : files) ok = ok && append_and_remove(all, part);
        if (all) std::fclose(all);
        if (!ok) {
            std::cerr << "error: cannot write " << series.string() << "\n";
            return 2;
        }
    }
    std::signal(SIGINT, SIG_DFL);
    std::signal(SIGTERM, SIG_DFL);
    if (interrupted) {
        std::cerr << "interrupted: the outputs up to the last step are in " << dir.string() << "\n";
        return 128 + interrupt_signal.load();
    }
    if (!options.quiet) std::cout << "outputs written to " << dir.string() << "/\n";
    return 0;
}

}  // namespace tessera::cli
