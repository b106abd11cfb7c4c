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
#include <mutex>
#include <system_error>

#include "cli/progress.hpp"
#include "core/engine.hpp"
#include "io/fields_writer.hpp"
#include "io/scenario_writer.hpp"
#include "io/series_writer.hpp"
#include "render/frame_recorder.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

std::atomic<bool> interrupted{false};
std::atomic<int> interrupt_signal{0};

extern "C" void on_interrupt(int signal) {
    if (interrupted.exchange(true)) std::_Exit(128 + signal);  // second Ctrl-C: leave at once
    interrupt_signal = signal;
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

// One replicate's outputs, written as the run goes and flushed after every output time, so a
// long run can be read while it runs and an interrupted one keeps what it had.
class ReplicateOutputs : public Observer {
public:
    ReplicateOutputs(std::FILE* series, std::FILE* habitat_series, std::unique_ptr<FieldsWriter> fields,
                     Progress& progress, int part, std::unique_ptr<FrameRecorder> frames = nullptr)
        : series_(series), habitat_series_(habitat_series), fields_(std::move(fields)), progress_(progress), part_(part),
          frames_(std::move(frames)) {}

    void observe(const Engine& engine, unsigned kinds) override {
        if (kinds & series_output) {
            buffer_.clear();
            append_series_rows(engine, buffer_);
            write(series_);
            buffer_.clear();
            append_habitat_series_rows(engine, buffer_);
            write(habitat_series_);
        }
        if ((kinds & fields_output) && fields_) fields_->append(engine);
        if ((kinds & frames_output) && frames_) frames_->observe(engine, kinds);
        progress_.report(part_, engine.time() / engine.until());
    }

private:
    void write(std::FILE* file) {
        std::fwrite(buffer_.data(), 1, buffer_.size(), file);
        std::fflush(file);
    }
    std::FILE* series_;
    std::FILE* habitat_series_;
    std::unique_ptr<FieldsWriter> fields_;
    Progress& progress_;
    int part_;
    std::unique_ptr<FrameRecorder> frames_;  // replicate 0 only, when output.frames_every > 0
    std::string buffer_;
};

// A CSV output: with one replicate it streams straight into its file; with several, each
// replicate streams into a part file of its own, joined in replicate order at the end, so the
// file never depends on scheduling.
class CsvOutput {
public:
    CsvOutput(fs::path file, std::string header, int replicates)
        : file_(std::move(file)), header_(std::move(header)) {
        if (replicates == 1) {
            parts_.push_back(file_);
        } else {
            for (int r = 0; r < replicates; ++r) {
                parts_.push_back(file_.parent_path() / (file_.stem().string() + ".replicate" + std::to_string(r) + ".part"));
            }
        }
    }
    ~CsvOutput() { close(); }

    bool open() {
        for (const fs::path& p : parts_) {
            std::FILE* h = std::fopen(p.c_str(), "wb");
            if (!h) {
                std::cerr << "error: cannot write " << p.string() << "\n";
                return false;
            }
            handles_.push_back(h);
        }
        if (parts_.size() == 1) std::fputs(header_.c_str(), handles_[0]);
        return true;
    }
    std::FILE* handle(int replicate) { return handles_[static_cast<std::size_t>(replicate)]; }

    // Closes the files and joins the parts; false (with a message) when writing failed.
    bool finish() {
        close();
        if (parts_.size() == 1) return true;
        std::FILE* all = std::fopen(file_.c_str(), "wb");
        bool ok = all != nullptr && std::fputs(header_.c_str(), all) >= 0;
        for (const fs::path& part : parts_) ok = ok && append_and_remove(all, part);
        if (all) ok = std::fclose(all) == 0 && ok;
        if (!ok) std::cerr << "error: cannot write " << file_.string() << "\n";
        return ok;
    }

private:
    void close() {
        for (std::FILE* h : handles_) std::fclose(h);
        handles_.clear();
    }
    fs::path file_;
    std::string header_;
    std::vector<fs::path> parts_;
    std::vector<std::FILE*> handles_;
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
    CsvOutput series(dir / "series.csv", series_header(), R);
    CsvOutput habitat_series(dir / "habitat_series.csv", habitat_series_header(), R);
    if (!series.open() || !habitat_series.open()) return 2;

    // Fields of replicate 0 go to fields.h5, of replicate r > 0 to fields.replicate<r>.h5.
    Progress progress(R, !options.quiet && Progress::stderr_is_terminal());
    std::mutex failure_mutex;
    std::string failure;
    tbb::parallel_for(0, R, [&](int r) {
        Engine engine(scenario, static_cast<std::uint32_t>(r));
        std::unique_ptr<FieldsWriter> fields;
        if (scenario.fields_every > 0) {
            const std::string name = r == 0 ? "fields.h5" : "fields.replicate" + std::to_string(r) + ".h5";
            try {
                fields = std::make_unique<FieldsWriter>((dir / name).string(), engine);
            } catch (const std::runtime_error& e) {
                std::lock_guard lock(failure_mutex);
                failure = e.what();
                interrupted = true;  // stop the other replicates too
                return;
            }
        }
        std::unique_ptr<FrameRecorder> frames;
        if (r == 0 && scenario.frames_every > 0) {
            frames = std::make_unique<FrameRecorder>(dir / "frames", scenario.frame_scale);
        }
        ReplicateOutputs outputs(series.handle(r), habitat_series.handle(r), std::move(fields), progress, r,
                                 std::move(frames));
        engine.run(outputs, &interrupted);
    });
    progress.finish();
    if (!series.finish() || !habitat_series.finish()) return 2;
    std::signal(SIGINT, SIG_DFL);
    std::signal(SIGTERM, SIG_DFL);
    if (!failure.empty()) {
        std::cerr << "error: " << failure << "\n";
        return 2;
    }
    if (interrupted) {
        std::cerr << "interrupted: the outputs up to the last step are in " << dir.string() << "\n";
        return 128 + interrupt_signal.load();
    }
    if (!options.quiet) std::cout << "outputs written to " << dir.string() << "/\n";
    return 0;
}

}  // namespace tessera::cli
