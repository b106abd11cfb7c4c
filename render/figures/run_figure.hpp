// The figure of one run directory: exponents (or counts, or dormant fractions) of every
// trait against time, in the trait palette of the viewer; ensemble median and 10-90 % band
// when ensemble.csv is there; the K -> infinity limit (dashed) and the deterministic model
// (dotted) over them when their files are there; schedule intervals shaded.
#pragma once

#include <vector>

#include "render/figures/figure_model.hpp"
#include "render/figures/run_inputs.hpp"

namespace tessera {

enum class PlotQuantity { exponents, counts, habitats, dormant };
enum class TimeAxis { logK, plain };
enum class PanelSplit { none, dormancy, habitat };

struct RunFigureOptions {
    PlotQuantity what = PlotQuantity::exponents;
    TimeAxis time = TimeAxis::logK;
    std::vector<int> traits;  // trait indices to show; empty: every trait with cells at some time
    int replicate_lines = 0;  // thin lines of the first N replicates (ensembles)
    PanelSplit panels = PanelSplit::none;
};

// --what habitats and --panels habitat need habitat_series.csv.
bool needs_habitat_series(const RunFigureOptions& options);

Figure build_run_figure(const RunInputs& inputs, const RunFigureOptions& options);

// The trait written as the legends write it: "(x, y)" with the trait coordinates.
std::string trait_label(const Scenario& scenario, int trait);

}  // namespace tessera
