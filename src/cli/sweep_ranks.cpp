#include "cli/sweep_ranks.hpp"

#include <algorithm>
#include <chrono>
#include <condition_variable>
#include <cstdint>
#include <cstring>
#include <deque>
#include <mutex>
#include <stdexcept>
#include <thread>
#include <vector>

#include "cluster/cluster.hpp"
#include "core/parallel.hpp"

namespace tessera::cli {

namespace {

// The first byte of every message says what it is.
constexpr char ask = 'A';       // rank -> 0: u32 how many more tasks it can take
constexpr char tasks = 'T';     // 0 -> rank: u64 task numbers; none: there are no more
constexpr char outcome = 'R';   // rank -> 0: an encoded TaskOutcome
constexpr char finished = 'F';  // rank -> 0: i32 the signal it had (0: none); its last message
constexpr char stop_now = 'S';  // 0 -> rank: stop after the current steps
constexpr char end_code = 'E';  // 0 -> rank: i32 the exit code; the last message of all

// Between looks for messages an idle main thread naps, from 50 us doubling up to 2 ms while
// nothing comes: soon after a message another often follows (an answer, the next outcome);
// in a long quiet spell each look costs MPI's progress engine a few microseconds, so 2 ms
// keeps the looking under 1 % of a core, and is still short beside any run.
class IdleNap {
public:
    void operator()() {
        std::this_thread::sleep_for(std::chrono::microseconds(us_));
        us_ = std::min(us_ * 2, 2000);
    }
    void reset() { us_ = 50; }

private:
    int us_ = 50;
};

template <class T>
void put(std::string& bytes, T value) {
    bytes.append(reinterpret_cast<const char*>(&value), sizeof value);
}

template <class T>
T get(const std::string& bytes, std::size_t at) {
    if (bytes.size() < at + sizeof(T)) throw std::runtime_error("a message between the sweep's ranks arrived cut short");
    T value;
    std::memcpy(&value, bytes.data() + at, sizeof value);
    return value;
}

}  // namespace

void SweepLead::run(std::size_t items, std::atomic<std::size_t>& next_item, const std::function<void()>& local,
                    const std::function<void(TaskOutcome&&)>& deliver, SweepStop stop) {
    std::atomic<bool> local_done{false};
    std::thread own([&] {
        local();
        local_done = true;
    });
    int unfinished = cluster::size() - 1;
    bool stop_sent = false;
    IdleNap nap;
    while (unfinished > 0 || !local_done) {
        if (*stop.requested && !stop_sent) {
            for (int q = 1; q < cluster::size(); ++q) link_.send(q, std::string(1, stop_now));
            stop_sent = true;
        }
        auto message = link_.poll();
        if (!message) {
            nap();
            continue;
        }
        nap.reset();
        const std::string& m = message->bytes;
        try {
            if (m.empty()) throw std::runtime_error("an empty message between the sweep's ranks");
            if (m[0] == ask) {
                const auto n = get<std::uint32_t>(m, 1);
                std::string reply(1, tasks);
                for (std::uint32_t k = 0; k < n && !*stop.requested; ++k) {
                    const std::size_t item = next_item.fetch_add(1);
                    if (item >= items) break;
                    put<std::uint64_t>(reply, item);
                }
                link_.send(message->from, reply);
            } else if (m[0] == outcome) {
                deliver(decode_task_outcome(m.substr(1)));
            } else if (m[0] == finished) {
                --unfinished;
                link_.watch(message->from, false);
                if (const int signal = get<std::int32_t>(m, 1); signal != 0) {
                    int none = 0;
                    stop.signal->compare_exchange_strong(none, signal);
                    *stop.requested = true;
                }
            }
        } catch (const std::runtime_error& e) {
            // A garbled message: stop as after a failed task, reporting it as one.
            TaskOutcome bad;
            bad.item = items;  // no task's: reported without a point
            bad.error = std::string("rank ") + std::to_string(message->from) + ": " + e.what();
            deliver(std::move(bad));
            *stop.requested = true;
        }
    }
    own.join();
}

void SweepLead::end(int code) {
    std::string m(1, end_code);
    put<std::int32_t>(m, code);
    for (int q = 1; q < cluster::size(); ++q) link_.send(q, m);
    link_.close();
}

int follow_sweep(const SweepWork& work, int threads, SweepStop stop) {
    cluster::TaskLink link("running the sweep's points");
    std::mutex mutex;
    std::condition_variable wake;
    std::deque<std::size_t> queue;    // under mutex
    bool no_more = false;             // under mutex
    std::vector<TaskOutcome> outbox;  // under mutex
    std::atomic<bool> done{false};

    std::thread own([&] {
        tessera::parallel_for(0, threads, [&](int) {
            for (;;) {
                std::size_t item = 0;
                {
                    std::unique_lock lock(mutex);
                    wake.wait(lock, [&] { return !queue.empty() || no_more || *stop.requested; });
                    if (*stop.requested || queue.empty()) return;
                    item = queue.front();
                    queue.pop_front();
                }
                TaskOutcome o = run_sweep_task(work, item, stop.requested);
                if (!o.result && o.error.empty()) continue;  // stopped before its end
                std::lock_guard lock(mutex);
                outbox.push_back(std::move(o));
            }
        });
        done = true;
    });

    // Tasks held (asked for and not yet sent back): a few more than threads, so that none
    // waits for the next answer of rank 0.
    const std::size_t want = 2 * static_cast<std::size_t>(threads);
    std::size_t held = 0;
    bool asking = false;
    bool told_stop = false;
    IdleNap nap;
    for (;;) {
        const bool last = done;  // read before the outbox: nothing is added after it
        std::vector<TaskOutcome> out;
        {
            std::lock_guard lock(mutex);
            out.swap(outbox);
        }
        for (const TaskOutcome& o : out) link.send(0, std::string(1, outcome) + encode_task_outcome(o));
        held -= std::min(held, out.size());
        if (!out.empty()) nap.reset();
        if (last) break;
        if (*stop.requested && !told_stop) {
            std::lock_guard lock(mutex);
            told_stop = true;
            wake.notify_all();
        }
        bool more = false;
        {
            std::lock_guard lock(mutex);
            more = !no_more;
        }
        if (!asking && more && !*stop.requested && held < want) {
            std::string m(1, ask);
            put<std::uint32_t>(m, static_cast<std::uint32_t>(want - held));
            link.send(0, m);
            asking = true;
        }
        auto message = link.poll();
        if (!message) {
            nap();
            continue;
        }
        nap.reset();
        const std::string& m = message->bytes;
        if (m.empty()) continue;
        if (m[0] == tasks) {
            std::lock_guard lock(mutex);
            const std::size_t n = (m.size() - 1) / sizeof(std::uint64_t);
            for (std::size_t k = 0; k < n; ++k) queue.push_back(get<std::uint64_t>(m, 1 + k * sizeof(std::uint64_t)));
            if (n == 0) no_more = true;
            held += n;
            asking = false;
            wake.notify_all();
        } else if (m[0] == stop_now) {
            *stop.requested = true;
        }
    }
    own.join();
    std::string bye(1, finished);
    put<std::int32_t>(bye, stop.signal->load());
    link.send(0, bye);
    // Rank 0 answers every rank once all have finished; what else arrives meanwhile (tasks
    // given just before the stop, a stop) no longer matters.
    for (;;) {
        auto message = link.poll();
        if (!message) {
            nap();
            continue;
        }
        if (!message->bytes.empty() && message->bytes[0] == end_code) {
            const int code = get<std::int32_t>(message->bytes, 1);
            link.close();
            return code;
        }
    }
}

}  // namespace tessera::cli
