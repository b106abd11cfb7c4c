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

// Layer table of the exponential ziggurat: x[1] = r, x[i+1] from equal areas
// x[i] (f(x[i+1]) - f(x[i])) = v with f(x) = exp(-x), x[256] = 0; x[0] = v / f(r) is the base
// layer's pseudo-width (its rectangle plus the tail beyond r has area v). f[i] = f(x[i]).
struct ExpZiggurat {
    static constexpr double r = 7.69711747013104972;  // the 256-layer constant (Marsaglia & Tsang 2000)
    double x[257];
    double f[257];
    ExpZiggurat() {
        const double v = (r + 1.0) * std::exp(-r);  // rectangle r f(r) plus tail f(r)
        x[0] = v / std::exp(-r);
        x[1] = r;
        for (int i = 1; i < 255; ++i) x[i + 1] = -std::log(std::exp(-x[i]) + v / x[i]);
        x[256] = 0.0;
        for (int i = 0; i < 257; ++i) f[i] = std::exp(-x[i]);
    }
};
inline const ExpZiggurat exp_ziggurat{};

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

    // Exponential with rate 1; never infinite. Ziggurat method (Marsaglia & Tsang 2000,
    // J. Stat. Softw. 5(8); layout of Doornik 2005, "An improved ziggurat method"): an exact
    // rejection sampler from 256 layers of equal area under exp(-x), whose base layer carries
    // the tail beyond r, drawn as r + Exp(1) by memorylessness. One draw suffices about 99% of
    // the time (no logarithm); the number of draws used depends only on the stream.
    double exponential() {
        const ExpZiggurat& z = exp_ziggurat;
        for (;;) {
            const std::uint64_t bits = (*this)();
            const unsigned i = bits & 0xff;                                    // layer: low 8 bits
            const double x = static_cast<double>(bits >> 11) * 0x1.0p-53 * z.x[i];  // top 53 bits
            if (x < z.x[i + 1]) return x;  // inside the layer's rectangle under the curve
            if (i == 0) return ExpZiggurat::r - std::log(1.0 - uniform());  // the tail
            if (z.f[i + 1] + (z.f[i] - z.f[i + 1]) * uniform() < std::exp(-x)) return x;  // wedge
        }
    }

    // Uniform integer in [0, n), n > 0 (Lemire's multiply-shift; bias below n / 2^64).
    std::uint64_t below(std::uint64_t n) {
        return static_cast<std::uint64_t>((static_cast<uint128>((*this)()) * n) >> 64);
    }

private:
    static std::uint64_t rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }
    std::uint64_t s_[4];
};

// Uniform integer in [0, n), n > 0, for counts of pairs that may pass 2^64: the 64-bit draw
// above when n fits (the same numbers as before), else rejection from 128 random bits.
inline uint128 below_128(Rng& rng, uint128 n) {
    if (n >> 64 == 0) return rng.below(static_cast<std::uint64_t>(n));
    const uint128 all = ~uint128{0};
    const uint128 limit = all - all % n;  // a multiple of n: below it every residue is equally likely
    for (;;) {
        const uint128 x = (static_cast<uint128>(rng()) << 64) | rng();
        if (x < limit) return x % n;
    }
}

}  // namespace tessera
