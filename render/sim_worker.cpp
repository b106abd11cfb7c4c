#include "render/sim_worker.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>

#include "core/exponent_scale.hpp"

namespace tessera {

namespace {

TraitHistoryPoint history_point(const Engine& e) {
    TraitHistoryPoint p;
    p.t_logK = e.time_logK();
    const int T = e.lattice().traits();
    std::vector<double> total(static_cast<std::size_t>(T), 0.0);
    const auto& a = e.lattice().all_active();
    const auto& d = e.lattice().all_dormant();
    for (std::size_t k = 0; k < a.size(); ++k) total[k % T] += static_cast<double>(a[k] + d[k]);
    // Schedules that change a capacity do not move P: the scale stays fixed during a run.
    const double patches = capacity_weighted_patches(e.scenario());
    for (double n : total) p.exponent.push_back(normalised_exponent(n, patches, e.scenario().K));
    return p;
}

}  // namespace

SimWorker::SimWorker(Scenario scenario) : scenario_(std::move(scenario)) {
    interval_ = scenario_.to_plain(scenario_.output_every > 0 ? scenario_.output_every : scenario_.until / 200.0);
    if (!(interval_ > 0)) interval_ = scenario_.sync;
    // Start so that the whole run takes about 20 seconds of watching.
    speed_ = std::max(scenario_.to_plain(scenario_.until) / 20.0, interval_);
    engine_ = std::make_unique<Engine>(scenario_);
    shared_ = snapshot_of(*engine_);
    history_.push_back(history_point(*engine_));
    version_ = 1;
    thread_ = std::thread([this] { loop(); });
}

SimWorker::~SimWorker() {
    {
        std::lock_guard lock(mutex_);
        stop_ = true;
    }
    wake_.notify_all();
    thread_.join();
}

void SimWorker::publish() {
    update_snapshot(shared_, *engine_);
    history_.push_back(history_point(*engine_));
    ++version_;
}

void SimWorker::loop() {
    using clock = std::chrono::steady_clock;
    auto anchor_wall = clock::now();
    double anchor_sim = 0.0;
    std::unique_lock lock(mutex_);
    for (;;) {
        wake_.wait(lock, [&] { return stop_ || restart_ || ((!paused_ || steps_requested_ > 0) && !finished_); });
        if (stop_) return;
        if (restart_) {
            restart_ = false;
            const Scenario fresh_scenario = scenario_;
            lock.unlock();
            auto fresh = std::make_unique<Engine>(fresh_scenario);
            lock.lock();
            engine_ = std::move(fresh);
            history_.clear();
            finished_ = false;
            error_.clear();
            publish();
            anchor_wall = clock::now();
            anchor_sim = 0.0;
            continue;
        }
        const bool single = paused_ && steps_requested_ > 0;
        if (single) --steps_requested_;
        const double until = engine_->until();
        const double target = std::min(engine_->time() + interval_, until);
        Engine* engine = engine_.get();
        lock.unlock();
        std::string failure;
        try {
            engine->advance_to(target);  // the long part, outside the lock
        } catch (const std::exception& e) {
            // A patch would pass 2^62 cells (CellLimitError), or a check failed: the engine
            // stands at the last step boundary it reached, which is shown; the run stops.
            failure = e.what();
            if (failure.empty()) failure = "the simulation stopped";
        }
        lock.lock();
        if (engine != engine_.get()) continue;  // replaced while we stepped
        publish();
        finished_ = engine_->time() >= until - 1e-12 * std::max(1.0, until) || !failure.empty();
        error_ = failure;
        // Pace: sleep until the wall clock catches up with simulated time at this speed.
        if (!single && !paused_) {
            const auto due = anchor_wall + std::chrono::duration<double>((engine_->time() - anchor_sim) / speed_);
            if (due > clock::now()) {
                wake_.wait_until(lock, due, [&] { return stop_ || restart_ || paused_; });
            } else if (clock::now() - due > std::chrono::milliseconds(250)) {
                anchor_wall = clock::now();  // fell behind (slow steps): do not try to catch up
                anchor_sim = engine_->time();
            }
        } else {
            anchor_wall = clock::now();
            anchor_sim = engine_->time();
        }
    }
}

std::uint64_t SimWorker::fetch(std::uint64_t version, FieldSnapshot& into, std::vector<TraitHistoryPoint>& history) const {
    std::lock_guard lock(mutex_);
    if (version != version_) {
        into = shared_;
        if (history.size() > history_.size()) history.clear();  // restarted
        history.insert(history.end(), history_.begin() + static_cast<std::ptrdiff_t>(history.size()), history_.end());
    }
    return version_;
}

void SimWorker::set_paused(bool paused) {
    {
        std::lock_guard lock(mutex_);
        paused_ = paused;
    }
    wake_.notify_all();
}

bool SimWorker::paused() const {
    std::lock_guard lock(mutex_);
    return paused_;
}

void SimWorker::step_once() {
    {
        std::lock_guard lock(mutex_);
        if (paused_) ++steps_requested_;
    }
    wake_.notify_all();
}

void SimWorker::set_speed(double s) {
    {
        std::lock_guard lock(mutex_);
        speed_ = std::clamp(s, 1e-6, 1e12);
    }
    wake_.notify_all();
}

double SimWorker::speed() const {
    std::lock_guard lock(mutex_);
    return speed_;
}

void SimWorker::restart(std::uint64_t seed) {
    {
        std::lock_guard lock(mutex_);
        scenario_.seed = seed;
        restart_ = true;
    }
    wake_.notify_all();
}

std::uint64_t SimWorker::seed() const {
    std::lock_guard lock(mutex_);
    return scenario_.seed;
}

bool SimWorker::finished() const {
    std::lock_guard lock(mutex_);
    return finished_;
}

std::string SimWorker::error() const {
    std::lock_guard lock(mutex_);
    return error_;
}

}  // namespace tessera
