// The physical memory of this machine, for messages that compare it with what a scenario
// would need.
#pragma once

#include <string>

namespace tessera {

// Bytes of physical memory, or 0 when the system does not say.
double machine_memory_bytes();

// "12.3 GiB" style text of a byte count.
std::string bytes_text(double bytes);

}  // namespace tessera
