#include "core/count_limit.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <utility>

#include "core/engine.hpp"

namespace tessera {

namespace {

// "4.43e18", "12", "0.5": three significant digits, no "+" or leading zeros in the exponent.
std::string short_number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.3g", v);
    std::string s = buf;
    const std::size_t e = s.find('e');
    if (e != std::string::npos) {
        std::size_t digits = e + 1;
        if (digits < s.size() && s[digits] == '+') s.erase(digits, 1);
        if (digits < s.size() && s[digits] == '-') ++digits;
        while (digits + 1 < s.size() && s[digits] == '0') s.erase(digits, 1);
    }
    return s;
}

std::string time_text(const Engine& e) {
    char buf[64];
    if (e.scenario().time_unit == TimeUnit::logK) {
        std::snprintf(buf, sizeof buf, "t/lnK = %.6g", e.time_logK());
    } else {
        std::snprintf(buf, sizeof buf, "t = %.6g", e.time());
    }
    return buf;
}

std::string trait_text(const Engine& e, int i) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "trait [%g, %g]", e.traits().dormancy(i), e.traits().transfer(i));
    return buf;
}

// Why the patch grows so far, and what to change.
std::string cause_and_remedy(const Engine& e, std::size_t patch, int trait) {
    const Scenario& s = e.scenario();
    if (e.conditions(patch).capacity <= 0) {
        return "habitat \"" + s.habitats[s.habitat_of_patch[patch]].name +
               "\" has capacity 0 at this time, so competition does not act in it: give it a capacity > 0 "
               "(also in [[schedule]]) or lower run.until";
    }
    if (e.rates().competition[static_cast<std::size_t>(trait)] <= 0) {
        if (s.rates.competition <= 0)
            return "rates.competition = 0, so nothing limits growth: set rates.competition > 0 or lower run.until";
        return "a [[rates.override]] sets competition = 0 for " + trait_text(e, trait) +
               ", so nothing limits its growth: give it competition > 0 or lower run.until";
    }
    return "with these rates a patch settles near K_p (b - d) / c cells, too close to the limit: lower scale.K or "
           "the habitat's capacity, or raise rates.competition";
}

}  // namespace

namespace {

// The fastest a patch's total can grow, per cell and unit time (count_limit.hpp).
double growth_bound(const Engine& e) {
    const Scenario& s = e.scenario();
    double lambda = 0.0;
    for (double b : e.rates().birth) lambda = std::max(lambda, b);
    if (e.lattice().patches() > 1) {
        double permeability = 0.0;
        for (const Habitat& h : s.habitats) permeability = std::max(permeability, h.permeability);
        for (const Schedule& sc : s.schedules) permeability = std::max(permeability, sc.permeability.value_or(0.0));
        lambda += std::max(s.rates.migration, s.rates.migration_dormant) * permeability;
    }
    return lambda;
}

// The fullest patch of [first, end) and its total (in doubles: a restored state is not
// trusted to keep sums in range).
std::pair<std::size_t, double> fullest_patch(const Lattice& lattice, std::size_t first, std::size_t end) {
    const int T = lattice.traits();
    double most = 0.0;
    std::size_t fullest = 0;
    for (std::size_t p = first; p < end; ++p) {
        const std::int64_t* a = lattice.active(p);
        const std::int64_t* d = lattice.dormant(p);
        double n = 0.0;
        for (int i = 0; i < T; ++i) n += static_cast<double>(a[i]) + static_cast<double>(d[i]);
        if (n > most) {
            most = n;
            fullest = p;
        }
    }
    return {fullest, most};
}

}  // namespace

double largest_patch_total(const Engine& e, std::size_t first, std::size_t end) {
    return fullest_patch(e.lattice(), first, end).second;
}

std::optional<double> step_end_below_limit(const Engine& e, double t_next, double most) {
    const double lambda = growth_bound(e);
    if (!(lambda > 0)) return t_next;  // nothing can add a cell anywhere
    if (!(most > 0)) return t_next;    // no cells: none can be born or arrive
    // Growth exponent lambda * dt that keeps the bound below the limit.
    const double reach = most * (1 + 1e-6) + 20 * std::sqrt(most) + 100;
    const double room = std::log(cell_limit_real / reach);
    const double dt = t_next - e.time();
    if (lambda * dt < room) return t_next;
    // A long step (large run.sync or output intervals) near the limit: at most 10% growth.
    const double short_growth = std::log(1.1);
    if (short_growth < room) return e.time() + short_growth / lambda;
    return std::nullopt;
}

double limit_step(const Engine& e, double t_next) {
    const Lattice& lattice = e.lattice();
    const Scenario& s = e.scenario();
    const int T = lattice.traits();
    if (!(growth_bound(e) > 0)) return t_next;  // no scan needed
    const auto [fullest, most] = fullest_patch(lattice, 0, lattice.patches());
    if (const auto end = step_end_below_limit(e, t_next, most)) return *end;

    // Stop. Name the patch's largest count.
    const std::int64_t* a = lattice.active(fullest);
    const std::int64_t* d = lattice.dormant(fullest);
    int trait = 0;
    bool dormant = false;
    std::int64_t largest = -1;
    for (int i = 0; i < T; ++i) {
        for (const bool in_dormancy : {false, true}) {
            const std::int64_t n = in_dormancy ? d[i] : a[i];
            if (n > largest) {
                largest = n;
                trait = i;
                dormant = in_dormancy;
            }
        }
    }
    const int col = static_cast<int>(fullest % static_cast<std::size_t>(lattice.width()));
    const int row = static_cast<int>(fullest / static_cast<std::size_t>(lattice.width()));
    const bool unbounded = e.conditions(fullest).capacity <= 0 || e.rates().competition[static_cast<std::size_t>(trait)] <= 0;
    const std::string message =
        (s.source_path.empty() ? std::string("scenario") : s.source_path) + ": the population " +
        (unbounded ? "grows without bound" : "grows too large") + ": at " + time_text(e) + " patch X=" +
        std::to_string(col) + ", Y=" + std::to_string(row) + " holds " + short_number(most) + " cells (" +
        short_number(static_cast<double>(largest)) + (dormant ? " dormant, " : " active, ") +
        trait_text(e, trait) + ") and the next step could take it past the limit of 2^62 (4.6e18) cells per patch; " +
        cause_and_remedy(e, fullest, trait);
    throw CellLimitError(message, e.time(), fullest, trait);
}

}  // namespace tessera
