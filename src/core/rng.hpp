// Random streams that belong to the work item, not to the thread.
//
// Each (seed, replicate, patch) has its own Philox4x64-10 key (Salmon et al. 2011,
// "Parallel random numbers: as easy as 1, 2, 3"); the counter is (step, phase). One Philox
// call yields 256 bits, which seed a xoshiro256++ generator (Blackman & Vigna 2021,
// "Scrambled linear pseudorandom number generators") used for the many draws inside that
// one step and phase. So the numbers a patch sees depend only on what it is and when, never
// on which thread runs it: 1 thread and N threads give the same bits, and a checkpoint
// needs only the step number to continue the same streams.
#pragma once

#include <Random123/philox.h>

#include <cmath>
#include <cstdint>

namespace tessera {

__extension__ using uint128 = unsigned __int128;  // g++/clang extension, used for one multiply

enum class Phase : std::uint64_t { local = 0, emigration = 1, immigration = 2, setup = 3 };

struct StreamKey {
    std::uint64_t seed = 0;
    std::uint32_t replicate = 0;
    std::uint32_t patch = 0;
};

class Rng {
public:
    using result_type = std::uint64_t;
    static constexpr result_type min() { return 0; }
    static constexpr result_type max() { return ~result_type{0}; }

    Rng(StreamKey key, std::uint64_t step, Phase phase) {
        r123::Philox4x64 philox;
        r123::Philox4x64::key_type k = {{key.seed, (std::uint64_t{key.replicate} << 32) | key.patch}};
        r123::Philox4x64::ctr_type c = {{step, static_cast<std::uint64_t>(phase), 0, 0}};
        auto out = philox(c, k);
        for (int i = 0; i < 4; ++i) s_[i] = out.v[i];
        if ((s_[0] | s_[1] | s_[2] | s_[3]) == 0) s_[0] = 1;  // xoshiro's one forbidden state
    }

    // xoshiro256++
    result_type operator()() {
        const std::uint64_t result = rotl(s_[0] + s_[3], 23) + s_[0];
        const std::uint64_t t = s_[1] << 17;
        s_[2] ^= s_[0];
        s_[3] ^= s_[1];
        s_[1] ^= s_[2];
        s_[0] ^= s_[3];
        s_[2] ^= t;
        s_[3] = rotl(s_[3], 45);
        return result;
    }

    // Uniform on [0, 1), 53 random bits.
    double uniform() { return static_cast<double>((*this)() >> 11) * 0x1.0p-53; }

    // Exponential with rate 1; never infinite.
    double exponential() { return -std::log1p(-uniform()); }

    // Uniform integer in [0, n), n > 0 (Lemire's multiply-shift; bias below n / 2^64).
    std::uint64_t below(std::uint64_t n) {
        return static_cast<std::uint64_t>((static_cast<uint128>((*this)()) * n) >> 64);
    }

private:
    static std::uint64_t rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }
    std::uint64_t s_[4];
};

}  // namespace tessera
