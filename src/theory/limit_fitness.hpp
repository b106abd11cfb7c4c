// Invasion fitness around a resident equilibrium (model.md section 7). The non-resident
// compartments (active and dormant cells of every trait not at exponent 1) follow, to first
// order, the linearisation of the deterministic limit at the equilibrium: a Metzler matrix
// (off-diagonal entries >= 0: resuscitation, dormancy, transfer into a product). Its strongly
// connected components are the classes that feed each other at order one; each grows at the
// leading eigenvalue (Perron root) of its block. For one trait with dormancy that block is
// the mean matrix of a two-type branching process, [[g, r sigma], [q C n / c, -(kappa + r
// sigma)]], whose Perron root is its growth rate (Athreya & Ney 1972, Branching Processes,
// ch. V).
#pragma once

#include <Eigen/Dense>

#include <vector>

#include "core/deterministic_ode.hpp"

namespace tessera {

// d(dy_c/dt)/dy_k at `equilibrium` for every non-resident compartment pair (c, k), as a full
// 2T x 2T matrix with zero rows and columns for residents. By finite differences of `ode`
// with step `step` and Richardson extrapolation (error O(step^2)): the very right-hand side
// the settling integrates, so every mechanism and override is in it.
Eigen::MatrixXd non_resident_jacobian(const DeterministicOde& ode, const std::vector<double>& equilibrium,
                                      const std::vector<char>& resident, double step);

// Leading eigenvalue (largest real part) of a square matrix; for a Metzler block it is real
// (Perron-Frobenius).
double leading_eigenvalue(const Eigen::MatrixXd& block);

struct FitnessClasses {
    std::vector<int> class_of;               // per compartment; -1 for residents
    std::vector<std::vector<int>> members;   // per class, compartments in increasing order
    std::vector<double> growth;              // per class: leading eigenvalue of its block
    struct Edge {
        int from, to;  // class `from` feeds class `to` at order one
    };
    std::vector<Edge> edges;                 // between distinct classes, each pair once
};

// Classes (strongly connected components of the graph with an edge k -> c where
// J(c, k) > threshold, c != k) of the non-resident compartments, in a fixed order (by their
// smallest compartment), their growth rates and the order-one edges between them.
FitnessClasses fitness_classes(const Eigen::MatrixXd& jacobian, const std::vector<char>& resident, double threshold);

}  // namespace tessera
