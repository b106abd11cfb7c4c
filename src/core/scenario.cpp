#include "core/scenario.hpp"

#include <cmath>

namespace tessera {

double Scenario::to_plain(double in_unit) const {
    return time_unit == TimeUnit::logK ? in_unit * std::log(K) : in_unit;
}

}  // namespace tessera
