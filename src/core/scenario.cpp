#include "core/scenario.hpp"

#include <cmath>

namespace tessera {

std::string Scenario::schedule_name(std::size_t i) const {
    const Schedule& sc = schedules[i];
    return sc.name.empty() ? sc.habitat + " schedule" : sc.name;
}

double Scenario::to_plain(double in_unit) const {
    return time_unit == TimeUnit::logK ? in_unit * std::log(K) : in_unit;
}

const char* name_of(TransferForm v) { return v == TransferForm::frequency ? "frequency" : "density"; }
const char* name_of(TransferCopies v) { return v == TransferCopies::whole ? "whole" : "transfer_only"; }
const char* name_of(TimeUnit v) { return v == TimeUnit::logK ? "logK" : "plain"; }

const char* name_of(Boundary v) {
    switch (v) {
        case Boundary::reflecting: return "reflecting";
        case Boundary::periodic: return "periodic";
        case Boundary::absorbing: return "absorbing";
    }
    return "reflecting";
}

const char* name_of(Method v) {
    switch (v) {
        case Method::auto_select: return "auto";
        case Method::exact: return "exact";
        case Method::leap: return "leap";
        case Method::exact_spatial: return "exact-spatial";
    }
    return "auto";
}

}  // namespace tessera
