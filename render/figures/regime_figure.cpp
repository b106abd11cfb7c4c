#include "render/figures/regime_figure.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>

#include "render/colour_lab.hpp"
#include "render/figures/regime_palette.hpp"

namespace tessera {

namespace {

std::string number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%g", v);
    return buf;
}

// Distinct values of key `k` in increasing order.
std::vector<double> levels(const SweepInputs& in, std::size_t k) {
    std::set<double> s;
    for (const auto& v : in.values) s.insert(v[k]);
    return {s.begin(), s.end()};
}

std::size_t position(const std::vector<double>& levels, double v) {
    return static_cast<std::size_t>(std::lower_bound(levels.begin(), levels.end(), v) - levels.begin());
}

std::vector<std::string> labels(const std::vector<double>& levels) {
    std::vector<std::string> out;
    for (double v : levels) out.push_back(number(v));
    return out;
}

// Dark text on light cells, white on dark ones.
Rgb8 text_on(Rgb8 fill) { return lab_from_rgb8(fill).L > 55 ? Rgb8{20, 20, 24} : Rgb8{255, 255, 255}; }

}  // namespace

std::string residents_label(const std::string& residents) {
    std::string out;
    std::size_t start = 0;
    while (start <= residents.size() && !residents.empty()) {
        const std::size_t end = std::min(residents.find(';', start), residents.size());
        std::string one = residents.substr(start, end - start);
        const std::size_t colon = one.find(':');
        if (colon != std::string::npos) one = "(" + one.substr(0, colon) + "," + one.substr(colon + 1) + ")";
        out += (out.empty() ? "" : "+") + one;
        start = end + 1;
    }
    return out;
}

PointRegime leading_regime(const SweepInputs& in, int point, const std::string& source) {
    std::map<std::string, int> regimes;
    std::map<std::pair<std::string, std::string>, int> residents;
    int n = 0;
    for (const auto& o : in.outcomes) {
        if (o.point != point || o.source != source) continue;
        ++regimes[o.regime];
        ++residents[{o.regime, o.residents}];
        ++n;
    }
    PointRegime r;
    r.replicates = n;
    // summary.csv, when present, is the sweep's own count (it may hold more replicates
    // than outcomes.csv lists after a merge); otherwise count the outcomes.
    double best = -1.0;
    for (const auto& s : in.summary) {
        if (s.point != point || s.source != source || s.kind != "regime") continue;
        if (s.fraction > best) {
            best = s.fraction;
            r.regime = s.name;
            r.agree = s.fraction;
            r.replicates = s.replicates;
        }
    }
    if (best < 0) {
        for (const std::string& name : regime_names()) {
            const auto it = regimes.find(name);
            if (it != regimes.end() && it->second > best) {
                best = it->second;
                r.regime = name;
                r.agree = n > 0 ? static_cast<double>(it->second) / n : 0.0;
            }
        }
    }
    int most = 0;
    for (const auto& [key, count] : residents)
        if (key.first == r.regime && count > most) {
            most = count;
            r.residents = key.second;
        }
    return r;
}

Figure build_regime_figure(const SweepInputs& in) {
    std::vector<std::string> sources;
    for (const char* s : {"limit", "run"})
        if (std::any_of(in.outcomes.begin(), in.outcomes.end(), [&](const SweepOutcome& o) { return o.source == s; }))
            sources.push_back(s);
    auto source_name = [&](const std::string& s) {
        if (s == "limit") return std::string("K \u2192 \u221e limit");
        int r = 0;
        for (int p : in.points) r = std::max(r, leading_regime(in, p, s).replicates);
        return "runs (" + std::to_string(r) + (r == 1 ? " replicate)" : " replicates)");
    };

    Figure f;
    const std::vector<double> xs = levels(in, 0);
    bool stochastic = false;
    auto cell = [&](double x, double y, const PointRegime& r) {
        Cell c;
        c.x0 = x - 0.5;
        c.x1 = x + 0.5;
        c.y0 = y - 0.5;
        c.y1 = y + 0.5;
        c.fill = regime_shade(*regime_colour(r.regime), r.agree);
        c.text = r.regime == "extinct" ? "" : residents_label(r.residents);
        c.text_colour = text_on(c.fill);
        stochastic = stochastic || r.agree < 1.0;
        return c;
    };
    if (in.keys.size() == 1) {
        Panel p;
        p.dark = false;
        p.x_categories = labels(xs);
        p.x_min = -0.5;
        p.x_max = static_cast<double>(xs.size()) - 0.5;
        p.y_min = -0.5;
        p.y_max = static_cast<double>(sources.size()) - 0.5;
        for (std::size_t s = 0; s < sources.size(); ++s) {
            p.y_categories.push_back(source_name(sources[s]));
            for (std::size_t i = 0; i < in.points.size(); ++i) {
                const PointRegime r = leading_regime(in, in.points[i], sources[s]);
                if (r.regime.empty()) continue;
                p.cells.push_back(cell(static_cast<double>(position(xs, in.values[i][0])), static_cast<double>(s), r));
            }
        }
        f.panels.push_back(std::move(p));
        f.x_label = in.keys[0];
    } else {
        const std::vector<double> ys = levels(in, 1);
        for (const auto& source : sources) {
            Panel p;
            p.dark = false;
            p.title = source_name(source);
            p.x_categories = labels(xs);
            p.y_categories = labels(ys);
            p.x_min = -0.5;
            p.x_max = static_cast<double>(xs.size()) - 0.5;
            p.y_min = -0.5;
            p.y_max = static_cast<double>(ys.size()) - 0.5;
            for (std::size_t i = 0; i < in.points.size(); ++i) {
                const PointRegime r = leading_regime(in, in.points[i], source);
                if (r.regime.empty()) continue;
                p.cells.push_back(cell(static_cast<double>(position(xs, in.values[i][0])),
                                       static_cast<double>(position(ys, in.values[i][1])), r));
            }
            f.panels.push_back(std::move(p));
        }
        f.x_label = in.keys[0];
        f.y_label = in.keys[1];
    }

    f.title = in.title.empty() ? "Regimes of a sweep over " + in.keys[0] + (in.keys.size() > 1 ? " and " + in.keys[1] : "")
                               : in.title;
    f.subtitle = std::to_string(in.points.size()) + " points; colour: regime at the end of the run; text: residents (dormancy, transfer)";
    f.legend.push_back({LegendEntry::Kind::heading, {}, "regime"});
    for (const auto& name : regime_names()) f.legend.push_back({LegendEntry::Kind::swatch, *regime_colour(name), name});
    if (stochastic) {
        f.legend.push_back({LegendEntry::Kind::heading, {}, "replicates in it"});
        for (double a : {1.0, 0.75, 0.5})
            f.legend.push_back({LegendEntry::Kind::swatch, regime_shade(*regime_colour("resident"), a),
                                number(a * 100) + " %"});
    }
    return f;
}

}  // namespace tessera
