#include "cli/progress.hpp"

#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace tessera::cli {

namespace {

std::string duration_text(double seconds) {
    char buf[32];
    if (!std::isfinite(seconds)) return "--";
    const long s = std::lround(seconds);
    if (s >= 3600) {
        std::snprintf(buf, sizeof buf, "%ldh%02ldm", s / 3600, (s / 60) % 60);
    } else if (s >= 60) {
        std::snprintf(buf, sizeof buf, "%ldm%02lds", s / 60, s % 60);
    } else {
        std::snprintf(buf, sizeof buf, "%lds", s);
    }
    return buf;
}

}  // namespace

bool Progress::stderr_is_terminal() { return isatty(STDERR_FILENO) == 1; }

Progress::Progress(int parts, bool enabled)
    : enabled_(enabled), fractions_(static_cast<std::size_t>(parts)), start_(std::chrono::steady_clock::now()) {
    for (auto& f : fractions_) f.store(0.0);
    if (enabled_) painter_ = std::thread([this] { loop(); });
}

Progress::~Progress() { finish(); }

void Progress::report(int part, double fraction_done) {
    fractions_[static_cast<std::size_t>(part)].store(fraction_done, std::memory_order_relaxed);
}

void Progress::show_count(int total, std::string unit) {
    std::lock_guard lock(mutex_);
    count_total_ = total;
    count_unit_ = std::move(unit);
}

void Progress::loop() {
    std::unique_lock lock(mutex_);
    while (!done_) {
        wake_.wait_for(lock, std::chrono::milliseconds(250));
        if (!done_) draw(false);
    }
}

void Progress::finish() {
    if (!enabled_) return;
    {
        std::lock_guard lock(mutex_);
        if (done_) return;
        done_ = true;
    }
    wake_.notify_all();
    if (painter_.joinable()) painter_.join();
    draw(true);
}

void Progress::draw(bool final) {
    double sum = 0;
    for (const auto& f : fractions_) sum += f.load(std::memory_order_relaxed);
    const double done = final ? 1.0 : std::clamp(sum / static_cast<double>(fractions_.size()), 0.0, 1.0);
    const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
    const double left = done > 0.002 ? elapsed * (1.0 - done) / done : NAN;
    constexpr int width = 30;
    const int filled = static_cast<int>(done * width);
    std::string bar(static_cast<std::size_t>(filled), '#');
    bar.append(static_cast<std::size_t>(width - filled), '.');
    std::string count;
    if (count_total_ > 0) {
        count = "  " + std::to_string(final ? count_total_ : count_done_.load(std::memory_order_relaxed)) + "/" +
                std::to_string(count_total_) + " " + count_unit_;
    }
    if (final) {
        std::fprintf(stderr, "\r[%s] 100%%%s  done in %s          \n", bar.c_str(), count.c_str(),
                     duration_text(elapsed).c_str());
    } else {
        std::fprintf(stderr, "\r[%s] %3d%%%s  elapsed %s  left ~%s   ", bar.c_str(), static_cast<int>(done * 100),
                     count.c_str(), duration_text(elapsed).c_str(), duration_text(left).c_str());
    }
    std::fflush(stderr);
}

}  // namespace tessera::cli
