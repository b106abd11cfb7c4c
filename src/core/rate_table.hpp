// Per-trait rates, built once from the [rates] defaults and the [[rates.override]] table.
// Hot data for the engines: dense arrays indexed by trait.
#pragma once

#include <array>
#include <vector>

#include "core/scenario.hpp"
#include "core/trait_grid.hpp"

namespace tessera {

// Where a mutant offspring of a trait may land, for one direction (forward or backward).
// Two targets: each with probability 1/2; one: that one; none: no mutation happens.
struct MutationTargets {
    std::array<int, 2> trait{-1, -1};
    int count = 0;
};

struct RateTable {
    RateTable(const TraitGrid& grid, const Rates& rates, double K);

    std::vector<double> birth;        // b(x,y), per active cell
    std::vector<double> death;        // d, per active cell (patch stress comes on top)
    std::vector<double> competition;  // C, per active cell, times N / K_p
    std::vector<double> dormancy_probability;  // q: a competition encounter makes the cell dormant
    std::vector<MutationTargets> forward;
    std::vector<MutationTargets> backward;

    double mutation_probability;  // mu = K^-alpha
    double mutation_backward;     // P(backward | mutation)
    double transfer;              // tau
    TransferForm transfer_form;
    TransferCopies transfer_copies;
    double dormant_death;   // kappa
    double resuscitation;   // sigma
    bool competition_counts_dormant;
};

}  // namespace tessera
