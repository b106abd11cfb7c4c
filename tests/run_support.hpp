// Shared pieces of the tests that compare the bytes of whole Engine runs (determinism,
// validation.md V13; checkpoints): an observer that collects the series text as
// series.csv holds it, and a run of a scenario to that text on a given number of threads.
#pragma once

#include <tbb/global_control.h>

#include <cstddef>
#include <cstdint>
#include <string>

#include "core/engine.hpp"
#include "io/series_writer.hpp"

namespace tessera::runtest {

// Collects the series rows of every output time.
struct CollectSeries : Observer {
    std::string text;
    void observe(const Engine& e, unsigned kinds) override {
        if (kinds & series_output) append_series_rows(e, text);
    }
};

// The series text of a whole run of one replicate, on the threads the caller allows.
inline std::string series_of(const Scenario& s, std::uint32_t replicate = 0) {
    Engine e(s, replicate);
    CollectSeries c;
    e.run(c);
    return c.text;
}

// The same on at most `threads` threads.
inline std::string run_text(const Scenario& s, int threads, std::uint32_t replicate = 0) {
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, static_cast<std::size_t>(threads));
    return series_of(s, replicate);
}

}  // namespace tessera::runtest
