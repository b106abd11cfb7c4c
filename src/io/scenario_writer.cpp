// scenario.resolved.toml: every setting of a loaded Scenario written out in full, so that a
// run can be repeated from its own output folder. Numbers are written in their shortest
// exact form, so load_scenario reads back the very same doubles.
#include "io/scenario_writer.hpp"

#include <filesystem>
#include <sstream>

#include "io/text_help.hpp"
#include "version.hpp"

namespace tessera {

namespace {

std::string where_text(const Inoculum& in) {
    auto n = [](int v) { return std::to_string(v); };
    switch (in.where) {
        case Inoculum::Where::all: return "all";
        case Inoculum::Where::habitat: return "habitat:" + in.habitat;
        case Inoculum::Where::patch: return "patch:" + n(in.x0) + "," + n(in.y0);
        case Inoculum::Where::rect: return "rect:" + n(in.x0) + "," + n(in.y0) + "," + n(in.x1) + "," + n(in.y1);
    }
    return "all";
}

class Writer {
public:
    void comment(const std::string& text) { out_ << "# " << text << "\n"; }
    void blank() { out_ << "\n"; }
    void header(const std::string& name) { out_ << "\n[" << name << "]\n"; }
    void array_header(const std::string& name) { out_ << "\n[[" << name << "]]\n"; }
    void number(const std::string& key, double v) { out_ << key << " = " << toml_number(v) << "\n"; }
    void number(const std::string& key, const std::optional<double>& v) {
        if (v) number(key, *v);
    }
    void integer(const std::string& key, long long v) { out_ << key << " = " << v << "\n"; }
    void text(const std::string& key, const std::string& v) { out_ << key << " = " << toml_string(v) << "\n"; }
    void boolean(const std::string& key, bool v) { out_ << key << " = " << (v ? "true" : "false") << "\n"; }
    void raw(const std::string& key, const std::string& v) { out_ << key << " = " << v << "\n"; }
    std::string str() const { return out_.str(); }

private:
    std::ostringstream out_;
};

std::string axis_text(const TraitAxis& a) {
    return "{ max = " + toml_number(a.max) + ", levels = " + std::to_string(a.levels) + " }";
}

std::string trait_text(double x, double y) { return "[" + toml_number(x) + ", " + toml_number(y) + "]"; }

// The conditions a habitat class sets and a schedule changes, under the same keys: a
// Habitat's are numbers, a Schedule's optional (the unset ones stay unwritten).
template <class Conditions>
void write_conditions(Writer& w, const Conditions& c) {
    w.number("capacity", c.capacity);
    w.number("stress", c.stress);
    w.number("resuscitation", c.resuscitation);
    w.number("permeability", c.permeability);
}

std::string absolute_text(const std::string& path) {
    if (path.empty()) return path;
    std::error_code ec;
    auto p = std::filesystem::absolute(path, ec);
    return ec ? path : p.lexically_normal().string();
}

}  // namespace

std::string resolved_scenario_toml(const Scenario& s) {
    Writer w;
    w.comment("Every setting of this run as used, defaults filled in (tessera " + std::string(version) + ").");
    w.comment("`tessera run` reads this file as it is; [provenance] is for people and is ignored.");
    w.blank();
    w.text("title", s.title);

    w.header("traits");
    w.raw("dormancy", axis_text(s.dormancy_axis));
    w.raw("transfer", axis_text(s.transfer_axis));

    const Rates& r = s.rates;
    w.header("rates");
    w.number("birth_max", r.birth_max);
    w.number("birth_cost_dormancy", r.birth_cost_dormancy);
    w.number("birth_cost_transfer", r.birth_cost_transfer);
    w.number("death", r.death);
    w.number("competition", r.competition);
    w.number("dormancy_probability", r.dormancy_probability);
    w.number("transfer", r.transfer);
    w.text("transfer_form", name_of(r.transfer_form));
    w.text("transfer_copies", name_of(r.transfer_copies));
    w.number("dormant_death", r.dormant_death);
    w.number("resuscitation", r.resuscitation);
    w.number("mutation_exponent", r.mutation_exponent);
    w.number("mutation_backward", r.mutation_backward);
    w.boolean("competition_counts_dormant", r.competition_counts_dormant);
    w.number("migration", r.migration);
    w.number("migration_dormant", r.migration_dormant);
    for (const RateOverride& o : r.overrides) {
        w.array_header("rates.override");
        w.raw("trait", trait_text(o.dormancy, o.transfer));
        w.number("birth", o.birth);
        w.number("death", o.death);
        w.number("competition", o.competition);
        w.number("dormancy_probability", o.dormancy_probability);
    }

    w.header("scale");
    w.number("K", s.K);

    w.header("lattice");
    w.integer("width", s.width);
    w.integer("height", s.height);
    w.integer("neighbourhood", s.neighbourhood);
    w.text("boundary", name_of(s.boundary));
    // The resolved file lives in a run's output folder, away from the scenario: an absolute
    // path keeps its map reachable from there.
    if (!s.map.empty()) w.text("map", absolute_text(s.map_path.empty() ? s.map : s.map_path));

    for (const Habitat& h : s.habitats) {
        w.array_header("habitat");
        w.text("name", h.name);
        // Symbols and colours at their defaults stay unwritten: the loader lets defaults repeat
        // (only written ones must differ), so writing them would make a scenario whose
        // habitats share the default colour fail to load back (found by fuzz_scenario).
        if (h.symbol != Habitat{}.symbol) w.text("symbol", h.symbol);
        if (h.colour != Habitat{}.colour) w.text("colour", h.colour);
        write_conditions(w, h);
    }

    for (const Inoculum& in : s.inocula) {
        w.array_header("inoculum");
        w.text("where", where_text(in));
        w.raw("trait", trait_text(in.dormancy, in.transfer));
        w.number("active", in.active);
        w.number("exponent", in.exponent);
        w.number("dormant", in.dormant);
    }

    for (const Schedule& sc : s.schedules) {
        w.array_header("schedule");
        if (!sc.name.empty()) w.text("name", sc.name);
        w.text("habitat", sc.habitat);
        w.number("start", sc.start);
        w.number("end", sc.end);
        if (sc.every > 0) w.number("every", sc.every);
        write_conditions(w, sc);
    }

    w.header("run");
    w.number("until", s.until);
    w.text("time_unit", name_of(s.time_unit));
    w.text("method", name_of(s.method));
    w.number("sync", s.sync);
    w.integer("seed", static_cast<long long>(s.seed));
    w.integer("threads", s.threads);
    w.number("checkpoint_every", s.checkpoint_every);

    w.header("output");
    w.number("every", s.output_every);
    w.number("fields_every", s.fields_every);
    w.number("frames_every", s.frames_every);
    w.integer("frame_scale", s.frame_scale);
    w.boolean("habitat_outlines", s.habitat_outlines);

    w.header("provenance");
    w.text("program", "tessera");
    w.text("version", version);
    w.text("build_id", build_id);
    if (!s.source_path.empty()) w.text("scenario", absolute_text(s.source_path));
    if (!s.map.empty()) w.text("map_as_written", s.map);
    return w.str();
}

}  // namespace tessera
