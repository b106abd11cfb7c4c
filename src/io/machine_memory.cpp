#include "io/machine_memory.hpp"

#include <unistd.h>

#include <cstdio>

namespace tessera {

double machine_memory_bytes() {
    const long pages = sysconf(_SC_PHYS_PAGES);
    const long page = sysconf(_SC_PAGE_SIZE);
    if (pages <= 0 || page <= 0) return 0.0;
    return static_cast<double>(pages) * static_cast<double>(page);
}

std::string bytes_text(double bytes) {
    const char* units[] = {"B", "KiB", "MiB", "GiB", "TiB", "PiB"};
    int u = 0;
    while (bytes >= 1024 && u < 5) {
        bytes /= 1024;
        ++u;
    }
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f %s", bytes, units[u]);
    return buf;
}

}  // namespace tessera
