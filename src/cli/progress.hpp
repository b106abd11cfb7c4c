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
};

}  // namespace tessera::cli
