// What the callgrind drivers (profile_*.cpp) share: the client requests that switch the
// instrumentation on and off (no-ops where valgrind's header is missing, so the drivers
// just run), and their optional numeric arguments.
#pragma once

#include <cstdlib>

#if __has_include(<valgrind/callgrind.h>)
#include <valgrind/callgrind.h>
#else
#define CALLGRIND_START_INSTRUMENTATION
#define CALLGRIND_STOP_INSTRUMENTATION
#endif

namespace tessera::bench {

// Command-line argument `i` read as a number, or `fallback` when it is not given.
inline double number_argument(int argc, char** argv, int i, double fallback) {
    return argc > i ? std::atof(argv[i]) : fallback;
}
inline int int_argument(int argc, char** argv, int i, int fallback) { return argc > i ? std::atoi(argv[i]) : fallback; }

}  // namespace tessera::bench
