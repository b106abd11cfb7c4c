// Step 2 of loading: the parsed TOML table -> Scenario. Types, single-value ranges, choices
// and unknown keys are checked here, next to the value; rules that relate several values
// are in scenario_check.cpp.
#include <charconv>
#include <cmath>
#include <limits>

#include "core/count_limit.hpp"
#include "io/scenario_findings.hpp"
#include "io/table_reader.hpp"
#include "io/text_help.hpp"

namespace tessera::scenario_io {

namespace {

using Keys = std::vector<std::string>;

const Keys top_keys = {"title", "traits", "rates", "scale", "lattice", "habitat",
                       "inoculum", "schedule", "run", "output", "provenance"};
const Keys axis_keys = {"max", "levels"};
const Keys rate_keys = {"birth_max", "birth_cost_dormancy", "birth_cost_transfer", "death", "competition",
                        "dormancy_probability", "transfer", "transfer_form", "transfer_copies", "dormant_death",
                        "resuscitation", "mutation_exponent", "mutation_backward", "competition_counts_dormant",
                        "migration", "migration_dormant", "override"};
const Keys override_keys = {"trait", "birth", "death", "competition", "dormancy_probability"};
const Keys lattice_keys = {"width", "height", "neighbourhood", "boundary", "map"};
const Keys habitat_keys = {"name", "symbol", "colour", "capacity", "stress", "resuscitation", "permeability"};
const Keys inoculum_keys = {"where", "trait", "active", "exponent", "dormant"};
const Keys schedule_keys = {"name", "habitat", "start", "end", "every", "capacity", "stress", "resuscitation",
                            "permeability"};
const Keys run_keys = {"until", "time_unit", "method", "sync", "seed", "threads", "checkpoint_every"};
const Keys output_keys = {"every", "fields_every", "frames_every", "frame_scale", "habitat_outlines"};

// One count may not pass what a whole patch may hold (core/count_limit.hpp).
const Bounds count_bounds{0.0, cell_limit_real, false, false, "a whole number >= 0 and below 2^62", true};
const std::string trait_accepted = "[dormancy, transfer], a trait on the grid";

std::string entry_name(const std::string& array, std::size_t i) {
    return array + "[" + std::to_string(i + 1) + "]";
}

void read_axis(TableReader& traits, const std::string& key, TraitAxis& axis, Findings& f) {
    const toml::table* t = traits.table(key, "an inline table { max = 4.0, levels = 3 }");
    TableReader r(t, traits.path(key), axis_keys, f);
    r.number("max", axis.max, Bounds::non_negative());
    r.integer("levels", axis.levels, 1, 1000, "an integer from 1 to 1000 (1 switches the mechanism off)");
}

void read_rates(const toml::table* t, Rates& rates, Findings& f) {
    TableReader r(t, "rates", rate_keys, f);
    const Bounds rate = Bounds::non_negative();
    r.number("birth_max", rates.birth_max, rate);
    r.number("birth_cost_dormancy", rates.birth_cost_dormancy, rate);
    r.number("birth_cost_transfer", rates.birth_cost_transfer, rate);
    r.number("death", rates.death, rate);
    r.number("competition", rates.competition, rate);
    r.number("dormancy_probability", rates.dormancy_probability, rate);
    r.number("transfer", rates.transfer, rate);
    r.choice("transfer_form", rates.transfer_form,
             {{"frequency", TransferForm::frequency}, {"density", TransferForm::density}});
    r.choice("transfer_copies", rates.transfer_copies,
             {{"whole", TransferCopies::whole}, {"transfer_only", TransferCopies::transfer_only}});
    r.number("dormant_death", rates.dormant_death, rate);
    r.number("resuscitation", rates.resuscitation, rate);
    r.number("mutation_exponent", rates.mutation_exponent,
             {0.0, std::numeric_limits<double>::infinity(), false, true, "a number >= 0, or inf for no mutation"});
    r.number("mutation_backward", rates.mutation_backward, Bounds::probability());
    r.boolean("competition_counts_dormant", rates.competition_counts_dormant);
    r.number("migration", rates.migration, rate);
    r.number("migration_dormant", rates.migration_dormant, rate);

    const auto entries = r.array_of_tables("override");
    for (std::size_t i = 0; i < entries.size(); ++i) {
        if (!entries[i]) continue;
        TableReader o(entries[i], entry_name("rates.override", i), override_keys, f);
        RateOverride ov;
        if (!o.has("trait")) o.report("trait", "missing; accepted: trait = " + trait_accepted);
        o.pair("trait", ov.dormancy, ov.transfer, trait_accepted);
        o.number("birth", ov.birth, rate);
        o.number("death", ov.death, rate);
        o.number("competition", ov.competition, rate);
        o.number("dormancy_probability", ov.dormancy_probability, Bounds::probability());
        rates.overrides.push_back(ov);
    }
}

void read_lattice(const toml::table* t, Scenario& s, Findings& f) {
    TableReader r(t, "lattice", lattice_keys, f);
    r.integer("width", s.width, 1, 100000, "an integer from 1 to 100000");
    r.integer("height", s.height, 1, 100000, "an integer from 1 to 100000");
    int k = s.neighbourhood;
    if (r.integer("neighbourhood", k, 4, 8, "4 or 8")) {
        if (k == 4 || k == 8)
            s.neighbourhood = k;
        else
            r.report("neighbourhood", "must be 4 or 8, got " + std::to_string(k) + "; accepted: 4 or 8");
    }
    r.choice("boundary", s.boundary,
             {{"reflecting", Boundary::reflecting}, {"periodic", Boundary::periodic}, {"absorbing", Boundary::absorbing}});
    r.text("map", s.map);
}

bool is_colour(const std::string& c) {
    if (c.size() != 7 || c[0] != '#') return false;
    for (std::size_t i = 1; i < 7; ++i)
        if (!std::isxdigit(static_cast<unsigned char>(c[i]))) return false;
    return true;
}

void read_habitats(const std::vector<const toml::table*>& entries, Scenario& s, Findings& f) {
    for (std::size_t i = 0; i < entries.size(); ++i) {
        Habitat h;
        if (entries[i]) {
            TableReader r(entries[i], entry_name("habitat", i), habitat_keys, f);
            r.text("name", h.name);
            if (r.has("name") && h.name.empty()) r.report("name", "must not be empty; accepted: a non-empty name");
            if (r.text("symbol", h.symbol)) {
                const bool ok = h.symbol.size() == 1 && h.symbol[0] > ' ' && h.symbol[0] < 127 && h.symbol[0] != ';';
                if (!ok)
                    r.report("symbol", "must be one character, got " + toml_string(h.symbol) +
                                           "; accepted: one printable ASCII character other than a space or ';'");
            }
            if (r.text("colour", h.colour) && !is_colour(h.colour))
                r.report("colour", "must be a colour #rrggbb, got " + toml_string(h.colour) +
                                       "; accepted: '#' and six hexadecimal digits, e.g. \"#d8d8d8\"");
            r.number("capacity", h.capacity, Bounds::non_negative());
            r.number("stress", h.stress, Bounds::non_negative());
            r.number("resuscitation", h.resuscitation, Bounds::non_negative());
            r.number("permeability", h.permeability, Bounds::non_negative());
        }
        s.habitats.push_back(h);
    }
    if (s.habitats.empty()) s.habitats.push_back(Habitat{});
}

// Whole numbers separated by commas, e.g. "3, 4" -> {3, 4}.
std::optional<std::vector<int>> parse_ints(std::string_view text, std::size_t count) {
    std::vector<int> out;
    std::size_t pos = 0;
    while (true) {
        std::size_t comma = text.find(',', pos);
        std::string_view part = text.substr(pos, comma == std::string_view::npos ? std::string_view::npos : comma - pos);
        while (!part.empty() && part.front() == ' ') part.remove_prefix(1);
        while (!part.empty() && part.back() == ' ') part.remove_suffix(1);
        int v = 0;
        auto r = std::from_chars(part.data(), part.data() + part.size(), v);
        if (part.empty() || r.ec != std::errc() || r.ptr != part.data() + part.size()) return std::nullopt;
        out.push_back(v);
        if (comma == std::string_view::npos) break;
        pos = comma + 1;
    }
    if (out.size() != count) return std::nullopt;
    return out;
}

void read_where(TableReader& r, Inoculum& in) {
    std::string where;
    if (!r.text("where", where)) return;
    const std::string accepted =
        "\"all\", \"habitat:NAME\", \"patch:X,Y\" or \"rect:X0,Y0,X1,Y1\" (X column, Y row, from 0)";
    if (where == "all") {
        in.where = Inoculum::Where::all;
    } else if (where.rfind("habitat:", 0) == 0 && where.size() > 8) {
        in.where = Inoculum::Where::habitat;
        in.habitat = where.substr(8);
    } else if (where.rfind("patch:", 0) == 0) {
        auto v = parse_ints(std::string_view(where).substr(6), 2);
        if (!v) {
            r.report("where", "cannot read " + toml_string(where) + " as a patch; accepted: " + accepted);
            return;
        }
        in.where = Inoculum::Where::patch;
        in.x0 = in.x1 = (*v)[0];
        in.y0 = in.y1 = (*v)[1];
    } else if (where.rfind("rect:", 0) == 0) {
        auto v = parse_ints(std::string_view(where).substr(5), 4);
        if (!v) {
            r.report("where", "cannot read " + toml_string(where) + " as a rectangle; accepted: " + accepted);
            return;
        }
        in.where = Inoculum::Where::rect;
        // Corners may come in any order; the rectangle is the same.
        in.x0 = std::min((*v)[0], (*v)[2]);
        in.x1 = std::max((*v)[0], (*v)[2]);
        in.y0 = std::min((*v)[1], (*v)[3]);
        in.y1 = std::max((*v)[1], (*v)[3]);
    } else {
        r.report("where", "unknown place " + toml_string(where) + "; accepted: " + accepted);
    }
}

void read_inocula(const std::vector<const toml::table*>& entries, Scenario& s, Findings& f) {
    for (std::size_t i = 0; i < entries.size(); ++i) {
        if (!entries[i]) continue;
        TableReader r(entries[i], entry_name("inoculum", i), inoculum_keys, f);
        Inoculum in;
        read_where(r, in);
        r.pair("trait", in.dormancy, in.transfer, trait_accepted);
        r.number("active", in.active, count_bounds);
        r.number("exponent", in.exponent, Bounds::non_negative());
        r.number("dormant", in.dormant, count_bounds);
        for (const char* k : {"active", "dormant"}) {
            const double v = std::string_view(k) == "active" ? in.active.value_or(0.0) : in.dormant;
            if (v != std::floor(v))
                r.report(k, "must be a whole number, got " + format_number(v) + "; accepted: " + count_bounds.accepted);
        }
        if (r.has("active") && r.has("exponent")) {
            r.report("exponent", "cannot be given together with active; accepted: either active (a count per "
                                 "patch) or exponent (K_p^exponent cells per patch)");
            in.exponent.reset();
        }
        if (!r.has("active") && !r.has("exponent")) {
            if (!r.has("dormant"))
                f.add(entry_name("inoculum", i),
                      "adds no cells; accepted: active = COUNT or exponent = E (and/or dormant = COUNT)");
            in.active = 0.0;
        }
        s.inocula.push_back(in);
    }
    if (entries.empty()) {
        // The documented default: the resident-free start of the model, K_p cells of trait
        // (0, 0) in every patch.
        Inoculum in;
        in.exponent = 1.0;
        s.inocula.push_back(in);
    }
}

void read_schedules(const std::vector<const toml::table*>& entries, Scenario& s, Findings& f) {
    for (std::size_t i = 0; i < entries.size(); ++i) {
        if (!entries[i]) continue;
        TableReader r(entries[i], entry_name("schedule", i), schedule_keys, f);
        Schedule sc;
        r.text("name", sc.name);
        if (!r.has("habitat")) r.report("habitat", "missing; accepted: the name of a [[habitat]]");
        r.text("habitat", sc.habitat);
        r.number("start", sc.start, Bounds::non_negative());
        if (!r.has("end")) r.report("end", "missing; accepted: a time after start, in run.time_unit");
        r.number("end", sc.end, Bounds::non_negative());
        r.number("every", sc.every, Bounds::positive());
        r.number("capacity", sc.capacity, Bounds::non_negative());
        r.number("stress", sc.stress, Bounds::non_negative());
        r.number("resuscitation", sc.resuscitation, Bounds::non_negative());
        r.number("permeability", sc.permeability, Bounds::non_negative());
        if (!r.has("capacity") && !r.has("stress") && !r.has("resuscitation") && !r.has("permeability"))
            f.add(entry_name("schedule", i),
                  "changes nothing; accepted: at least one of capacity, stress, resuscitation, permeability");
        s.schedules.push_back(sc);
    }
}

void read_run(const toml::table* t, Scenario& s, Findings& f) {
    TableReader r(t, "run", run_keys, f);
    r.number("until", s.until, Bounds::positive());
    r.choice("time_unit", s.time_unit, {{"logK", TimeUnit::logK}, {"plain", TimeUnit::plain}});
    r.choice("method", s.method,
             {{"auto", Method::auto_select}, {"exact", Method::exact}, {"leap", Method::leap},
              {"exact-spatial", Method::exact_spatial}});
    r.number("sync", s.sync, {0.0, std::numeric_limits<double>::infinity(), true, false,
                              "a finite number > 0 (plain time, whatever run.time_unit says)"});
    r.integer("seed", s.seed, 0, std::numeric_limits<std::int64_t>::max(), "a whole number >= 0");
    r.integer("threads", s.threads, 0, 65536, "a whole number >= 0 (0: all cores)");
    r.number("checkpoint_every", s.checkpoint_every,
             {0.0, std::numeric_limits<double>::infinity(), false, false,
              "a finite number >= 0 (seconds of wall time; 0: checkpoints only at the end and on interruption)"});
}

void read_output(const toml::table* t, Scenario& s, Findings& f) {
    TableReader r(t, "output", output_keys, f);
    r.number("every", s.output_every, Bounds::positive());
    r.number("fields_every", s.fields_every, {0.0, std::numeric_limits<double>::infinity(), false, false,
                                              "a finite number >= 0 (0: no fields)"});
    r.number("frames_every", s.frames_every, {0.0, std::numeric_limits<double>::infinity(), false, false,
                                              "a finite number >= 0 (0: no frames)"});
    r.integer("frame_scale", s.frame_scale, 1, 256, "a whole number from 1 to 256 (pixels per patch)");
    r.boolean("habitat_outlines", s.habitat_outlines);
}

}  // namespace

void read_scenario(const toml::table& root, Scenario& s, Findings& f) {
    TableReader top(&root, "", top_keys, f);
    top.text("title", s.title);
    {
        const toml::table* t = top.table("traits", "a [traits] table with dormancy and transfer");
        TableReader traits(t, "traits", {"dormancy", "transfer"}, f);
        read_axis(traits, "dormancy", s.dormancy_axis, f);
        read_axis(traits, "transfer", s.transfer_axis, f);
    }
    read_rates(top.table("rates", "a [rates] table"), s.rates, f);
    {
        TableReader scale(top.table("scale", "a [scale] table"), "scale", {"K"}, f);
        scale.number("K", s.K, {1.0, 1e18, false, false, "a number from 1 to 1e18"});
    }
    read_lattice(top.table("lattice", "a [lattice] table"), s, f);
    read_habitats(top.array_of_tables("habitat"), s, f);
    read_inocula(top.array_of_tables("inoculum"), s, f);
    read_schedules(top.array_of_tables("schedule"), s, f);
    read_run(top.table("run", "a [run] table"), s, f);
    read_output(top.table("output", "an [output] table"), s, f);
    // [provenance] is written by resolved_scenario_toml for people; the loader ignores it.
    top.table("provenance", "a [provenance] table");
}

}  // namespace tessera::scenario_io
