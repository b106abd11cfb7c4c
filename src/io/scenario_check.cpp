// Step 4 of loading: the rules that relate several values (the birth rate over the whole
// trait grid, traits on the grid, names that must exist or be unique, places inside the
// lattice, schedule times). Single values were range-checked as they were read.
#include <cmath>
#include <map>

#include "core/count_limit.hpp"
#include "core/memory_estimate.hpp"
#include "core/trait_grid.hpp"
#include "io/machine_memory.hpp"
#include "io/scenario_findings.hpp"
#include "io/text_help.hpp"

namespace tessera::scenario_io {

namespace {

// Patches x traits: each pair holds an active and a dormant 8-byte count (16 GB at the limit).
constexpr double state_count_limit = 1e9;

std::string entry(const char* array, std::size_t i) { return std::string(array) + "[" + std::to_string(i + 1) + "]"; }

// "0, 2, 4", shortened for long axes to "0, 0.1, 0.2, ..., 10".
std::string levels_text(const TraitAxis& axis) {
    const double step = axis.levels > 1 ? axis.max / (axis.levels - 1) : 0.0;
    std::vector<std::string> v;
    if (axis.levels <= 6) {
        for (int l = 0; l < axis.levels; ++l) v.push_back(format_number(l * step));
    } else {
        for (int l = 0; l < 3; ++l) v.push_back(format_number(l * step));
        v.push_back("...");
        v.push_back(format_number(axis.max));
    }
    return join_list(v);
}

std::string trait_text(double x, double y) { return "[" + format_number(x) + ", " + format_number(y) + "]"; }

std::string grid_accepted(const Scenario& s) {
    return "a trait with dormancy one of " + levels_text(s.dormancy_axis) + " and transfer one of " +
           levels_text(s.transfer_axis);
}

// What is wrong with a trait (x, y) that is not on the grid, and what is accepted.
std::string off_grid(const Scenario& s, double x, double y) {
    return "trait " + trait_text(x, y) + " is not on the grid; accepted: " + grid_accepted(s);
}

bool axis_ok(const TraitAxis& a) { return a.levels >= 1 && std::isfinite(a.max) && a.max >= 0 && (a.levels == 1 || a.max > 0); }

void check_axes(const Scenario& s, Findings& f) {
    for (auto [name, axis] : {std::pair{"dormancy", &s.dormancy_axis}, std::pair{"transfer", &s.transfer_axis}}) {
        if (axis->levels > 1 && axis->max == 0.0) {
            const std::string key = std::string("traits.") + name + ".max";
            f.add(f.place_any({key, std::string("traits.") + name + ".levels"}), key,
                  "must be > 0 when levels > 1, got 0; accepted: a number > 0, or levels = 1 to switch the "
                  "mechanism off");
        }
    }
}

void check_rates_on_grid(const Scenario& s, Findings& f) {
    const TraitGrid grid(s.dormancy_axis, s.transfer_axis);
    const Rates& r = s.rates;

    std::map<int, std::size_t> overridden;  // trait -> first override entry
    for (std::size_t i = 0; i < r.overrides.size(); ++i) {
        const RateOverride& o = r.overrides[i];
        const std::string key = entry("rates.override", i) + ".trait";
        auto t = grid.find(o.dormancy, o.transfer);
        if (!t) {
            f.add(key, off_grid(s, o.dormancy, o.transfer));
            continue;
        }
        auto [it, fresh] = overridden.emplace(*t, i);
        if (!fresh)
            f.add(key, "trait " + trait_text(o.dormancy, o.transfer) + " is already overridden by " +
                           entry("rates.override", it->second) + " (line " +
                           std::to_string(f.place(entry("rates.override", it->second)).line) +
                           "); accepted: one override per trait, holding all its rates");
    }

    // q(x) = p x is a probability at every level.
    const double q_max = r.dormancy_probability * grid.dormancy_max();
    if (q_max > 1.0) {
        f.add(f.place_any({"rates.dormancy_probability", "traits.dormancy.max", "traits.dormancy"}),
              "rates.dormancy_probability",
              "p * x_max = " + format_number(r.dormancy_probability) + " * " + format_number(grid.dormancy_max()) +
                  " = " + format_number(q_max) + " is above 1, but q(x) = p * x is a probability; accepted: p <= " +
                  format_number(1.0 / grid.dormancy_max()) + " (1 / x_max)");
    }

    // b(x, y) >= 0 everywhere; 0 is allowed (that trait never divides).
    std::vector<std::string> negative;
    for (int t = 0; t < grid.size(); ++t) {
        const double x = grid.dormancy(t), y = grid.transfer(t);
        if (overridden.count(t) && r.overrides[overridden[t]].birth) continue;
        const double b = r.birth_max - r.birth_cost_dormancy * x - r.birth_cost_transfer * y;
        if (b < 0) negative.push_back("b(" + format_number(x) + ", " + format_number(y) + ") = " + format_number(b));
    }
    if (!negative.empty()) {
        f.add(f.place_any({"rates.birth_cost_dormancy", "rates.birth_cost_transfer", "rates.birth_max",
                           "traits.dormancy", "traits.transfer"}),
              "rates.birth_max",
              "birth rate b(x, y) = birth_max - birth_cost_dormancy * x - birth_cost_transfer * y is negative at " +
                  join_list(negative) +
                  "; accepted: b >= 0 at every trait (raise birth_max, lower the costs, or give those traits a "
                  "[[rates.override]] birth)");
    }

    for (std::size_t i = 0; i < s.inocula.size(); ++i) {
        const Inoculum& in = s.inocula[i];
        if (!grid.find(in.dormancy, in.transfer))
            f.add(entry("inoculum", i) + ".trait", off_grid(s, in.dormancy, in.transfer));
    }
}

// The names of the habitat classes, for messages and suggestions.
std::vector<std::string> habitat_names(const Scenario& s) {
    std::vector<std::string> names;
    for (const Habitat& h : s.habitats) names.push_back(h.name);
    return names;
}

std::string unknown_habitat(const Scenario& s, const std::string& name) {
    const auto names = habitat_names(s);
    const std::string suggestion = closest_match(name, names);
    std::string m = "no habitat is named " + toml_string(name);
    if (!suggestion.empty()) m += " (did you mean " + toml_string(suggestion) + "?)";
    return m + "; accepted: " + join_list(names);
}

bool has_habitat(const Scenario& s, const std::string& name) {
    for (const Habitat& h : s.habitats)
        if (h.name == name) return true;
    return false;
}

// Habitat i's `field` (spelt `shown` in messages, compared as `value`) must not repeat
// one of an earlier habitat; `seen` maps the values met so far to their habitat.
void check_unique(std::map<std::string, std::size_t>& seen, const std::string& value, std::size_t i,
                  const char* field, const std::string& shown, const char* accepted, Findings& f) {
    auto [it, fresh] = seen.emplace(value, i);
    if (!fresh)
        f.add(entry("habitat", i) + "." + field, std::string(field) + " " + shown + " is also used by " +
                                                     entry("habitat", it->second) + "; accepted: " + accepted);
}

void check_habitats(const Scenario& s, Findings& f) {
    if (s.habitats.size() > 65535)
        f.add("habitat", "there are " + std::to_string(s.habitats.size()) + " classes; accepted: at most 65535");
    // Names always, symbols and colours where written: the defaults may repeat until a map
    // needs them (the map loader checks those it uses).
    std::map<std::string, std::size_t> names, symbols, colours;
    for (std::size_t i = 0; i < s.habitats.size(); ++i) {
        const Habitat& h = s.habitats[i];
        check_unique(names, h.name, i, "name", toml_string(h.name), "a name no other habitat has", f);
        if (f.has(entry("habitat", i) + ".symbol"))
            check_unique(symbols, h.symbol, i, "symbol", toml_string(h.symbol),
                         "a character no other habitat uses", f);
        if (f.has(entry("habitat", i) + ".colour")) {
            std::string lower = h.colour;
            for (char& c : lower) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
            check_unique(colours, lower, i, "colour", h.colour, "a colour no other habitat uses", f);
        }
    }
}

// K_p = K * capacity is the scale every count in a patch grows to: it must stay a number of
// cells a count can hold, with room for the fluctuations above it.
constexpr double patch_capacity_limit = 1e18;

void check_capacities(const Scenario& s, Findings& f) {
    auto check = [&](const std::string& key, double capacity) {
        const double Kp = s.K * capacity;
        if (!(Kp <= patch_capacity_limit))
            f.add(f.place_any({key, "scale.K"}), key,
                  "K * capacity = " + format_number(s.K) + " * " + format_number(capacity) + " = " + format_number(Kp) +
                      " cells per patch is too many; accepted: K * capacity <= 1e18 (capacity <= " +
                      format_number(patch_capacity_limit / s.K) + " with this K)");
    };
    for (std::size_t i = 0; i < s.habitats.size(); ++i) check(entry("habitat", i) + ".capacity", s.habitats[i].capacity);
    for (std::size_t i = 0; i < s.schedules.size(); ++i)
        if (s.schedules[i].capacity) check(entry("schedule", i) + ".capacity", *s.schedules[i].capacity);
}

void check_inocula(const Scenario& s, Findings& f) {
    double max_capacity = 0.0;
    for (const Habitat& h : s.habitats) max_capacity = std::max(max_capacity, h.capacity);
    // A schedule in force at t = 0 sets the capacity the inoculum sees.
    for (const Schedule& sc : s.schedules) max_capacity = std::max(max_capacity, sc.capacity.value_or(0.0));
    // Inocula add up where they overlap; bounded as if all of them did.
    double per_patch = 0.0;
    const std::string inside = "a place inside the " + std::to_string(s.width) + " x " + std::to_string(s.height) +
                               " lattice: X from 0 to " + std::to_string(s.width - 1) + ", Y from 0 to " +
                               std::to_string(s.height - 1);
    for (std::size_t i = 0; i < s.inocula.size(); ++i) {
        const Inoculum& in = s.inocula[i];
        const std::string key = entry("inoculum", i);
        if (in.where == Inoculum::Where::habitat && !has_habitat(s, in.habitat))
            f.add(key + ".where", unknown_habitat(s, in.habitat));
        if (in.where == Inoculum::Where::patch || in.where == Inoculum::Where::rect) {
            const bool ok = in.x0 >= 0 && in.y0 >= 0 && in.x1 < s.width && in.y1 < s.height;
            if (!ok)
                f.add(key + ".where", std::string(in.where == Inoculum::Where::patch ? "patch " : "rectangle ") +
                                          "reaches outside the lattice; accepted: " + inside);
        }
        double cells = in.active.value_or(0.0);
        if (in.exponent && s.K * max_capacity > 1.0) {
            cells = std::pow(s.K * max_capacity, *in.exponent);
            if (!(cells < cell_limit_real))
                f.add(key + ".exponent", "K_p^exponent = " + format_number(cells) +
                                             " cells per patch is too many; accepted: an exponent giving fewer "
                                             "than 2^62 cells");
        }
        per_patch += cells + in.dormant;
    }
    if (!(per_patch < cell_limit_real) && !s.inocula.empty())
        f.add(entry("inoculum", s.inocula.size() - 1),
              "the inocula together put up to " + format_number(per_patch) +
                  " cells in one patch; accepted: fewer than 2^62 (4.6e18) cells per patch in total");
}

void check_schedules(const Scenario& s, Findings& f) {
    for (std::size_t i = 0; i < s.schedules.size(); ++i) {
        const Schedule& sc = s.schedules[i];
        const std::string key = entry("schedule", i);
        if (f.has(key + ".habitat") && !has_habitat(s, sc.habitat)) f.add(key + ".habitat", unknown_habitat(s, sc.habitat));
        if (f.has(key + ".end") && !(sc.end > sc.start))
            f.add(key + ".end", "must be after start (" + format_number(sc.start) + "), got " + format_number(sc.end) +
                                    "; accepted: a time > start, in run.time_unit");
        if (f.has(key + ".every") && sc.end > sc.start && sc.every < sc.end - sc.start)
            f.add(key + ".every", "repeats every " + format_number(sc.every) + ", sooner than the change lasts (" +
                                      format_number(sc.end - sc.start) + "); accepted: every >= end - start");
    }
}

}  // namespace

void check_scenario(const Scenario& s, Findings& f) {
    check_axes(s, f);
    if (axis_ok(s.dormancy_axis) && axis_ok(s.transfer_axis)) check_rates_on_grid(s, f);
    check_habitats(s, f);
    check_inocula(s, f);
    check_schedules(s, f);
    check_capacities(s, f);
    const double patches = static_cast<double>(s.width) * s.height;
    const double traits = static_cast<double>(s.dormancy_axis.levels) * s.transfer_axis.levels;
    // What the state would take, and what this machine has, so a refused size can be judged.
    const auto memory_note = [&] {
        const double need = lattice_memory_bytes(patches, traits, s.neighbourhood);
        const double have = machine_memory_bytes();
        return " (it would need about " + bytes_text(need) + " of memory" +
               (have > 0 ? "; this machine has " + bytes_text(have) : std::string()) + ")";
    };
    if (patches > 1e8) {
        f.add(f.place_any({"lattice.width", "lattice.map", "lattice"}), "lattice.width",
              "the lattice has " + format_number(patches) + " patches" + memory_note() +
                  "; accepted: at most 1e8 patches");
    } else if (axis_ok(s.dormancy_axis) && axis_ok(s.transfer_axis)) {
        // The state is one active and one dormant 8-byte count per trait per patch, and the
        // exact spatial engine keeps as much again: refuse what no machine of ours can hold.
        if (patches * traits > state_count_limit)
            f.add(f.place_any({"lattice.width", "lattice.map", "traits.dormancy", "traits"}), "lattice",
                  format_number(patches) + " patches x " + format_number(traits) + " traits = " +
                      format_number(patches * traits) + " counts per compartment is too large" + memory_note() +
                      "; accepted: patches x traits <= 1e9 (16 GB), with fewer trait levels or a smaller lattice");
    }
}

}  // namespace tessera::scenario_io
