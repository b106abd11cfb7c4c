// tessera::parallel_for: tbb::parallel_for over [begin, end), and under ThreadSanitizer the
// fork and join that TBB guarantees, told to TSan explicitly.
//
// oneTBB comes prebuilt without TSan's instrumentation, so TSan cannot see that everything
// written before a parallel_for happens before its bodies run, and everything the bodies
// write happens before the code after it: it would report every capture and every result as
// raced (docs/reliability.md "Sanitizers"). The annotations below state exactly those two
// edges and nothing more, so races between bodies (two patches writing the same memory)
// are still found. In other builds this is tbb::parallel_for itself.
#pragma once

#include <tbb/parallel_for.h>

#if defined(__SANITIZE_THREAD__)
#define TESSERA_TSAN 1
#elif defined(__has_feature)
#if __has_feature(thread_sanitizer)
#define TESSERA_TSAN 1
#endif
#endif

#ifdef TESSERA_TSAN
extern "C" void __tsan_acquire(void* addr);
extern "C" void __tsan_release(void* addr);
#endif

namespace tessera {

#ifdef TESSERA_TSAN
namespace detail {
// The addresses TSan keys the fork and join edges on. Globals, so that a body reaches them
// without reading anything of the caller's first (that read would itself look raced). All
// parallel_for calls share them, which only adds edges.
inline char tsan_fork = 0;
inline char tsan_join = 0;
}  // namespace detail
#endif

template <class Index, class Body>
void parallel_for(Index begin, Index end, const Body& body) {
#ifdef TESSERA_TSAN
    // The closure is made before the release, so that its own bytes are covered by it.
    const auto annotated = [&](Index i) {
        __tsan_acquire(&detail::tsan_fork);
        body(i);
        __tsan_release(&detail::tsan_join);
    };
    __tsan_release(&detail::tsan_fork);
    tbb::parallel_for(begin, end, annotated);
    __tsan_acquire(&detail::tsan_join);
#else
    tbb::parallel_for(begin, end, body);
#endif
}

}  // namespace tessera
