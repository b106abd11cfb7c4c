// FNV-1a, 64-bit (Fowler, Noll and Vo; parameters from http://www.isthe.com/chongo/tech/comp/fnv/
// and draft-eastlake-fnv): a byte-at-a-time hash, enough to catch a truncated, torn or
// bit-flipped checkpoint. It is not meant to resist deliberate tampering.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string_view>

namespace tessera {

inline constexpr std::uint64_t fnv1a64_offset_basis = 14695981039346656037ull;
inline constexpr std::uint64_t fnv1a64_prime = 1099511628211ull;

// Continues the hash `h` over `bytes` (start with fnv1a64_offset_basis).
constexpr std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t h = fnv1a64_offset_basis) {
    for (const char c : bytes) {
        h ^= static_cast<unsigned char>(c);
        h *= fnv1a64_prime;
    }
    return h;
}

// The published test vectors.
static_assert(fnv1a64("") == 0xcbf29ce484222325ull);
static_assert(fnv1a64("a") == 0xaf63dc4c8601ec8cull);
static_assert(fnv1a64("foobar") == 0x85944171f73967e8ull);

}  // namespace tessera
