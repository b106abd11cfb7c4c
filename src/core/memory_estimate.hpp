// How much memory a lattice's state takes, for `tessera check`'s estimate and for the
// loader's message when a lattice is refused for its size. Per patch and trait: an active and
// a dormant 8-byte count, and the migration phase's outgoing buffer (one active and one
// dormant count per direction); per patch about 96 bytes of conditions and event books.
#pragma once

namespace tessera {

inline double lattice_memory_bytes(double patches, double traits, int neighbourhood) {
    return patches * traits * (16.0 + 2.0 * neighbourhood * 8.0) + patches * 96.0;
}

}  // namespace tessera
