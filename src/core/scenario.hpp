// The validated description of one simulation: every setting of the scenario file, with
// defaults filled in. It is plain data: the core never parses or prints it (src/io does).
// Times are in plain model time unless a name says otherwise (`*_in_unit` fields are in
// `run.time_unit`).
#pragma once

#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace tessera {

struct TraitAxis {
    double max = 4.0;  // value of the highest level
    int levels = 3;    // levels 0, max/(levels-1), ..., max; 1 level switches the mechanism off

    bool operator==(const TraitAxis&) const = default;
};

enum class TransferForm { frequency, density };
enum class TransferCopies { whole, transfer_only };

// Per-trait replacement of a rate; unset fields keep the grid-wide value.
struct RateOverride {
    double dormancy = 0.0;  // trait coordinates, must lie on the grid
    double transfer = 0.0;
    std::optional<double> birth;
    std::optional<double> death;
    std::optional<double> competition;
    std::optional<double> dormancy_probability;  // q for this trait directly (not p)

    bool operator==(const RateOverride&) const = default;
};

struct Rates {
    double birth_max = 4.0;
    double birth_cost_dormancy = 0.5;
    double birth_cost_transfer = 0.5;
    double death = 1.0;
    double competition = 1.0;
    double dormancy_probability = 0.1;  // p; q(x) = p * x
    double transfer = 10.0;             // tau
    TransferForm transfer_form = TransferForm::frequency;
    TransferCopies transfer_copies = TransferCopies::whole;
    double dormant_death = 0.0;      // kappa
    double resuscitation = 1.0;      // sigma
    double mutation_exponent = 0.5;  // alpha; mutation probability K^-alpha (inf: none)
    double mutation_backward = 0.0;
    bool competition_counts_dormant = false;
    double migration = 0.05;
    double migration_dormant = 0.0;
    std::vector<RateOverride> overrides;

    bool operator==(const Rates&) const = default;
};

enum class Boundary { reflecting, periodic, absorbing };

struct Habitat {
    std::string name = "open";
    std::string symbol = ".";
    std::string colour = "#d8d8d8";
    double capacity = 1.0;  // multiplier of K; 0 is a wall
    double stress = 0.0;    // extra death rate of active cells
    double resuscitation = 1.0;
    double permeability = 1.0;

    bool operator==(const Habitat&) const = default;
};

struct Inoculum {
    enum class Where { all, habitat, patch, rect };
    Where where = Where::all;
    std::string habitat;         // for Where::habitat
    int x0 = 0, y0 = 0, x1 = 0, y1 = 0;  // patch (x0,y0) or rect corners, inclusive
    double dormancy = 0.0;       // trait coordinates
    double transfer = 0.0;
    std::optional<double> active;    // count per patch
    std::optional<double> exponent;  // or K_p^exponent active cells per patch
    double dormant = 0.0;

    bool operator==(const Inoculum&) const = default;
};

// A change of a habitat class's properties during [start, end), repeating every `every`
// (0: once). Times in run.time_unit as written; the engine converts.
struct Schedule {
    std::string name;  // shown in frames and the viewer while on; "" = "<habitat> schedule"
    std::string habitat;
    double start = 0.0;
    double end = 0.0;
    double every = 0.0;
    std::optional<double> capacity, stress, resuscitation, permeability;

    bool operator==(const Schedule&) const = default;
};

enum class TimeUnit { logK, plain };
enum class Method { auto_select, exact, leap, exact_spatial };

struct Scenario {
    std::string title;
    std::string source_path;  // the file it came from (for messages and relative paths)

    TraitAxis dormancy_axis{4.0, 3};
    TraitAxis transfer_axis{4.0, 3};
    Rates rates;
    double K = 1e4;

    int width = 1;
    int height = 1;
    int neighbourhood = 4;
    Boundary boundary = Boundary::reflecting;
    std::string map;                  // as written in the file ("" = none)
    std::string map_path;             // the map file as opened, absolute ("" = none)
    std::vector<Habitat> habitats;    // never empty after loading; [0] is the default class
    std::vector<std::uint16_t> habitat_of_patch;  // width*height, row-major, top row first

    std::vector<Inoculum> inocula;
    std::vector<Schedule> schedules;

    double until = 20.0;  // in time_unit
    TimeUnit time_unit = TimeUnit::logK;
    Method method = Method::auto_select;
    double sync = 0.01;  // plain time, always (a numerical parameter, not an observation time)
    std::uint64_t seed = 1;
    int threads = 0;
    // Wall-clock seconds between checkpoints (taken at the first output time after that
    // long); 0: only at the end and on interruption. Never changes the results.
    double checkpoint_every = 600.0;

    double output_every = 0.1;  // in time_unit
    double fields_every = 1.0;  // in time_unit, 0 = none
    double frames_every = 0.0;  // in time_unit, 0 = none
    int frame_scale = 4;
    bool habitat_outlines = true;  // outline habitat classes in the views of cells

    // What frames and the viewer call schedule `i` ([[schedule]] name, or "<habitat> schedule").
    std::string schedule_name(std::size_t i) const;

    // Plain-time value of a duration written in run.time_unit.
    double to_plain(double in_unit) const;

    // Field-by-field equality (a resolved scenario file reads back equal, see src/io).
    bool operator==(const Scenario&) const = default;
};

// The spelling of each choice in scenario files (interfaces.md), for messages and outputs.
const char* name_of(TransferForm v);
const char* name_of(TransferCopies v);
const char* name_of(TimeUnit v);
const char* name_of(Boundary v);
const char* name_of(Method v);

}  // namespace tessera
