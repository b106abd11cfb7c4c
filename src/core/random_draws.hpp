// Poisson and binomial variates for the leap engine, drawn from our Rng so that a patch's
// numbers depend only on its stream (rng.hpp), never on the thread.
//
// Poisson: inversion by sequential search for small means (Devroye 1986, Non-Uniform Random
// Variate Generation, section X.3.3), and Hormann's transformed rejection with squeeze, PTRS
// (W. Hormann 1993, "The transformed rejection method for generating Poisson random
// variables", Insurance: Mathematics and Economics 12:39-45) for means of 10 and more. PTRS
// costs O(1) for any mean, so a leap at K = 1e12 costs what it costs at K = 1e4.
//
// Binomial: inversion for small means (Devroye 1986, section X.4.3), otherwise Hormann's
// BTRS (W. Hormann 1993, "The generation of binomial random variates", J. Statist. Comput.
// Simul. 46:101-110), O(1) per draw for any n. The leap engine draws binomials to split
// conjugations over donor traits; the migration phase draws one per (trait, compartment)
// and direction in every patch and step, so their cost matters there.
#pragma once

#include <cstdint>

#include "core/rng.hpp"

namespace tessera {

// A Poisson variate of mean `mean` (>= 0; 0 gives 0).
std::int64_t poisson(Rng& rng, double mean);

// A binomial variate: successes in n trials of probability p (p clamped to [0, 1]).
std::int64_t binomial(Rng& rng, std::int64_t n, double p);

// n items each put in one of `ways` boxes with equal probability (a multinomial with equal
// cell probabilities): out[0 .. ways-1] receive the counts. For 4 or 8 boxes and up to a
// few thousand items every item gets its own box from 2 or 3 random bits, 32 or 21 items per
// 64-bit draw counted with popcounts (exact, and cheaper than the ways - 1 binomials it
// replaces); otherwise sequential binomials.
void split_uniformly(Rng& rng, std::int64_t n, int ways, std::int64_t* out);

}  // namespace tessera
