// STUB (session 3 skeleton): the limit is being written; every call says so.
#include "theory/exponent_limit.hpp"

#include <cmath>
#include <stdexcept>

namespace tessera {

const char* name_of(PhaseEnd end) {
    switch (end) {
        case PhaseEnd::invasion: return "invasion";
        case PhaseEnd::until: return "until";
        case PhaseEnd::no_equilibrium: return "no_equilibrium";
        case PhaseEnd::no_resident: return "no_resident";
        case PhaseEnd::tie: return "tie";
    }
    return "?";
}

double LimitPrediction::exponent_at(int, double) const { return std::nan(""); }

std::optional<std::string> limit_not_applicable(const Scenario&) {
    return std::string("the exponent limit is not built yet");
}

LimitPrediction predict_limit(const Scenario&, const LimitSettings&) {
    throw std::logic_error("predict_limit: not built yet");
}

std::optional<ResidentCycle> find_cycle(const LimitPrediction&, int) { return std::nullopt; }

}  // namespace tessera
