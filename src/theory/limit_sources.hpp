// Sources of the exponent limit (model.md section 7): what keeps a class of non-resident
// compartments from falling below other exponents. A floor is
//   beta(class) >= beta(class1) + beta(class2) + offset   (a missing class counts 0):
//   - order-one coupling from class k (Jacobian edge):        beta_k             (offset 0)
//   - mutation from parent j into a target's active cells:     beta_j - alpha     (1 - alpha
//     for a resident parent); forward targets, and backward ones when mutation_backward > 0
//     (model.md section 2), none when the parent cannot divide or alpha = inf;
//   - transfer product (transfer_copies = "transfer_only"), recipient j and donor k both
//     below 1: rate ~ K^(beta_j + beta_k - 1) into (x_j, y_k):  beta_j + beta_k - 1.
// The power-law mutation picture is that of Durrett & Mayberry (2011), Ann. Appl. Probab.
// 21:699-744; the transfer products are our own extension of it.
#pragma once

#include <vector>

#include "theory/limit_fitness.hpp"
#include "theory/limit_model.hpp"

namespace tessera {

struct FloorSource {
    int class1 = -1;  // -1: none (counts 0)
    int class2 = -1;
    double offset = 0.0;

    bool operator<(const FloorSource& o) const {
        if (class1 != o.class1) return class1 < o.class1;
        if (class2 != o.class2) return class2 < o.class2;
        return offset < o.offset;
    }
};

// Per class of `classes`, its floors (duplicates removed). `resident` per compartment.
std::vector<std::vector<FloorSource>> floor_sources(const LimitModel& model, const FitnessClasses& classes,
                                                    const std::vector<char>& resident);

}  // namespace tessera
