// The regime map of a sweep: for one varied key a strip per source (the K -> infinity limit,
// the stochastic runs), for two keys a heatmap per source; each cell coloured by the regime
// (regime_palette.hpp), paler where fewer of the replicates are in it, and the residents
// written in when they fit.
#pragma once

#include "render/figures/figure_model.hpp"
#include "render/figures/sweep_inputs.hpp"

namespace tessera {

// The regime of one point and source: the one most replicates reached.
struct PointRegime {
    std::string regime;
    double agree = 1.0;      // fraction of the replicates in it
    int replicates = 0;
    std::string residents;   // the most common resident set among those replicates
};

PointRegime leading_regime(const SweepInputs& in, int point, const std::string& source);

Figure build_regime_figure(const SweepInputs& inputs);

// "x:y;x:y" as the map writes it in a cell, compactly: "(x,y)+(x,y)".
std::string residents_label(const std::string& residents);

}  // namespace tessera
