// The simulation beside the window: a worker thread advances an Engine in output intervals
// (output.every), paced to a chosen speed (simulated plain time per wall-clock second), and
// after each interval copies the counts into a shared snapshot under a mutex. The window
// thread only ever reads that copy, so drawing never waits for a long step and a long step
// never waits for drawing.
#pragma once

#include <condition_variable>
#include <cstdint>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "core/engine.hpp"
#include "render/field_snapshot.hpp"

namespace tessera {

// Normalised exponent of every trait at one time, for the live plot.
struct TraitHistoryPoint {
    double t_logK = 0.0;
    // log(1 + N / P) / log K per trait: N = A + D summed over patches, P the capacity-weighted
    // number of habitable patches (render/exponent_scale.hpp); 1 = at capacity everywhere.
    std::vector<double> exponent;
};

class SimWorker {
public:
    explicit SimWorker(Scenario scenario);
    ~SimWorker();  // stops and joins the thread
    SimWorker(const SimWorker&) = delete;
    SimWorker& operator=(const SimWorker&) = delete;

    // Copies the latest snapshot into `into` if it changed since `version`; returns the
    // current version. History points newer than `history_size` are appended to `history`.
    std::uint64_t fetch(std::uint64_t version, FieldSnapshot& into, std::vector<TraitHistoryPoint>& history) const;

    void set_paused(bool paused);
    bool paused() const;
    void step_once();                   // one output interval, when paused
    void set_speed(double plain_per_second);
    double speed() const;
    void restart(std::uint64_t seed);   // a fresh engine from the same scenario with this seed
    std::uint64_t seed() const;
    bool finished() const;              // reached run.until, or stopped by error()
    // Why the simulation stopped before run.until ("" while it has not): the message of a
    // CellLimitError (core/count_limit.hpp), or of any other failure of a step. The
    // snapshot then shows the last state reached; restart() clears it.
    std::string error() const;
    double interval() const { return interval_; }

private:
    void loop();
    void publish();  // under mutex_

    Scenario scenario_;
    double interval_;  // plain time per output interval
    std::unique_ptr<Engine> engine_;

    mutable std::mutex mutex_;
    std::condition_variable wake_;
    FieldSnapshot shared_;
    std::vector<TraitHistoryPoint> history_;
    std::uint64_t version_ = 0;
    bool paused_ = false;
    int steps_requested_ = 0;
    double speed_;
    bool stop_ = false;
    bool restart_ = false;
    bool finished_ = false;
    std::string error_;
    std::thread thread_;
};

}  // namespace tessera
