// The normalised exponent of a total over many patches: log(1 + N / P) / log K, P the number
// of habitable patches weighted by their capacity (sum of K_p / K). A trait at carrying
// capacity everywhere is at 1, a single cell on the lattice at about 0, and on one patch it
// is the usual log(1 + N) / log K. Used where the per-patch column of series.csv is not at
// hand (the viewer's live plot, figures of files written before that column existed), and the
// P of that column itself (series_writer), of sweeps and of ensembles: one definition for all.
#pragma once

#include "core/scenario.hpp"

namespace tessera {

// Sum over patches of habitat class `habitat_class` (every class when < 0) of their
// capacity (walls count 0).
double capacity_weighted_patches(const Scenario& scenario, int habitat_class = -1);

// log(1 + cells / patches) / log K; 0 when patches <= 0.
double normalised_exponent(double cells, double patches, double K);

}  // namespace tessera
