// An indexed binary min-heap of next-event times, one slot per patch: the priority queue of
// the next-subvolume method (Elf & Ehrenberg 2004). update() moves one slot in O(log n).
#pragma once

#include <cstddef>
#include <utility>
#include <vector>

namespace tessera {

class EventQueue {
public:
    explicit EventQueue(std::size_t size) : time_(size), heap_(size), where_(size) {
        for (std::size_t i = 0; i < size; ++i) heap_[i] = where_[i] = i;
    }

    std::size_t top() const { return heap_.front(); }
    double top_time() const { return time_[heap_.front()]; }
    double time(std::size_t slot) const { return time_[slot]; }

    void update(std::size_t slot, double t) {
        time_[slot] = t;
        std::size_t h = where_[slot];
        while (h > 0 && less(h, (h - 1) / 2)) {
            swap(h, (h - 1) / 2);
            h = (h - 1) / 2;
        }
        for (;;) {
            const std::size_t l = 2 * h + 1, r = l + 1;
            std::size_t m = h;
            if (l < heap_.size() && less(l, m)) m = l;
            if (r < heap_.size() && less(r, m)) m = r;
            if (m == h) break;
            swap(h, m);
            h = m;
        }
    }

private:
    // Ties broken by slot number, so the order never depends on anything but the times.
    bool less(std::size_t a, std::size_t b) const {
        const double ta = time_[heap_[a]], tb = time_[heap_[b]];
        return ta < tb || (ta == tb && heap_[a] < heap_[b]);
    }
    void swap(std::size_t a, std::size_t b) {
        std::swap(heap_[a], heap_[b]);
        where_[heap_[a]] = a;
        where_[heap_[b]] = b;
    }
    std::vector<double> time_;        // by slot
    std::vector<std::size_t> heap_;   // heap position -> slot
    std::vector<std::size_t> where_;  // slot -> heap position
};

}  // namespace tessera
