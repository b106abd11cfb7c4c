// A one-line progress bar with an estimate of the time left, drawn on stderr only when it
// is a terminal (and the user did not ask for --quiet). Thread-safe: replicates running in
// parallel each report their own fraction done.
#pragma once

#include <atomic>
#include <chrono>
#include <condition_variable>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

namespace tessera::cli {

class Progress {
public:
    // `parts`: how many independent pieces of work (replicates) report progress.
    Progress(int parts, bool enabled);
    ~Progress();

    void report(int part, double fraction_done);  // fraction in [0, 1]
    void finish();                               // draws 100% and ends the line
    // Also shows "done/total unit" (e.g. "3/20 points"), done reported by count_done.
    void show_count(int total, std::string unit);
    void count_done(int done) { count_done_.store(done, std::memory_order_relaxed); }

    static bool stderr_is_terminal();

private:
    void draw(bool final);
    void loop();

    bool enabled_;
    std::vector<std::atomic<double>> fractions_;
    std::chrono::steady_clock::time_point start_;
    std::mutex mutex_;
    std::condition_variable wake_;
    bool done_ = false;
    std::thread painter_;
    std::atomic<int> count_done_{0};
    int count_total_ = 0;  // 0: no count shown
    std::string count_unit_;
};

}  // namespace tessera::cli
