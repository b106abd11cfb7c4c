// When the exponent limit applies to a scenario (exponent_limit.hpp limit_not_applicable).
#include <string>

#include "theory/exponent_limit.hpp"

namespace tessera {

std::optional<std::string> limit_not_applicable(const Scenario& s) {
    if (s.width * s.height != 1) {
        return "the scenario has " + std::to_string(s.width) + " x " + std::to_string(s.height) +
               " patches (lattice.width, lattice.height); the exponent limit describes one well-mixed patch";
    }
    if (!(s.K > 1)) return std::string("scale.K must be above 1 for exponents log(1 + N) / ln K");
    if (s.rates.mutation_exponent == 0) {
        return std::string("rates.mutation_exponent = 0 makes every offspring a mutant; the limit needs "
                           "mutation_exponent > 0 (or inf for no mutation)");
    }
    const std::size_t cls = s.habitat_of_patch.empty() ? 0 : s.habitat_of_patch[0];
    const Habitat home = cls < s.habitats.size() ? s.habitats[cls] : Habitat{};
    if (!(home.capacity > 0)) return "the only patch is a wall (habitat \"" + home.name + "\" has capacity = 0)";
    for (std::size_t i = 0; i < s.schedules.size(); ++i) {
        const Schedule& sc = s.schedules[i];
        if (sc.habitat != home.name) continue;  // never touches the one patch
        const std::string key = "schedule[" + std::to_string(i + 1) + "]";
        if (s.time_unit == TimeUnit::plain) {
            return key + " (habitat \"" + sc.habitat + "\") is timed in plain time (run.time_unit = \"plain\"); the limit " +
                   "changes conditions on the t / ln K scale only: set run.time_unit = \"logK\" and give its times in t / ln K";
        }
        if (sc.capacity && !(*sc.capacity > 0))
            return key + " sets capacity = 0 (a wall) on the only patch; the limit needs a patch that holds cells";
    }
    return std::nullopt;
}

}  // namespace tessera
