#include "cli/sweep_task.hpp"

#include <cstdint>
#include <cstring>
#include <stdexcept>

#include "cli/sweep_runner.hpp"
#include "io/series_writer.hpp"

namespace tessera::cli {

namespace {

// The full series of a replicate, as series.csv holds it (--keep-series).
struct SeriesText : Observer {
    std::string text;
    void observe(const Engine& engine, unsigned kinds) override {
        if (kinds & series_output) append_series_rows(engine, text);
    }
};

class Writer {
public:
    template <class T>
    void put(const T& value) {
        const char* p = reinterpret_cast<const char*>(&value);
        bytes.append(p, sizeof value);
    }
    void put_text(const std::string& text) {
        put<std::uint64_t>(text.size());
        bytes += text;
    }
    std::string bytes;
};

class Reader {
public:
    explicit Reader(const std::string& bytes) : bytes_(bytes) {}
    template <class T>
    T get() {
        T value;
        need(sizeof value);
        std::memcpy(&value, bytes_.data() + at_, sizeof value);
        at_ += sizeof value;
        return value;
    }
    std::string get_text() {
        const auto n = static_cast<std::size_t>(get<std::uint64_t>());
        need(n);
        std::string text = bytes_.substr(at_, n);
        at_ += n;
        return text;
    }
    bool at_end() const { return at_ == bytes_.size(); }

private:
    void need(std::size_t n) const {
        if (bytes_.size() - at_ < n) throw std::runtime_error("a sweep task's result arrived cut short");
    }
    const std::string& bytes_;
    std::size_t at_ = 0;
};

}  // namespace

SweepWork make_sweep_work(const LoadedGrid& loaded, const SweepManifest& m, std::size_t first) {
    SweepWork w;
    const std::vector<std::size_t> mine = shard_points(loaded.grid.size(), m.shard_index, m.shard_count);
    for (std::size_t k = first; k < mine.size(); ++k) {
        const std::size_t i = mine[k];
        w.points.push_back(i);
        Scenario s = loaded.scenarios[i];
        s.seed = point_seed(m.seed.value_or(s.seed), i);
        w.scenarios.push_back(std::move(s));
    }
    w.with_limit = m.with_limit;
    w.per_point = (m.with_limit ? 1 : 0) + (m.with_run ? m.replicates : 0);
    w.keep_series = m.keep_series;
    w.regimes.eps = m.eps;
    w.regimes.final_window = m.final_window;
    return w;
}

TaskOutcome run_sweep_task(const SweepWork& work, std::size_t item, const std::atomic<bool>* stop) {
    TaskOutcome out;
    out.item = item;
    const Scenario& scenario = work.scenarios[work.point_of(item)];
    const int j = work.replicate_of(item);
    try {
        if (j < 0) {
            out.result = limit_point(scenario, work.regimes);
        } else {
            SeriesText text;
            out.result = run_replicate(scenario, j, work.regimes, stop, work.keep_series ? &text : nullptr);
            if (out.result && work.keep_series) out.series = std::move(text.text);
        }
    } catch (const std::exception& e) {
        out.result.reset();
        out.error = e.what();
        if (out.error.empty()) out.error = "failed";
    }
    return out;
}

std::string encode_task_outcome(const TaskOutcome& o) {
    Writer w;
    w.put<std::uint64_t>(o.item);
    w.put_text(o.error);
    w.put<std::uint8_t>(o.result ? 1 : 0);
    if (o.result) {
        const Outcome& c = o.result->outcome;
        w.put<std::int32_t>(static_cast<std::int32_t>(c.regime));
        w.put<std::uint64_t>(c.residents.size());
        for (int r : c.residents) w.put<std::int32_t>(r);
        w.put<std::uint8_t>(c.period ? 1 : 0);
        w.put<double>(c.period.value_or(0.0));
        w.put<double>(c.final_t_logK);
        w.put<std::uint64_t>(o.result->final_exponents.size());
        for (double x : o.result->final_exponents) w.put<double>(x);
    }
    w.put_text(o.series);
    return w.bytes;
}

TaskOutcome decode_task_outcome(const std::string& bytes) {
    Reader r(bytes);
    TaskOutcome o;
    o.item = static_cast<std::size_t>(r.get<std::uint64_t>());
    o.error = r.get_text();
    if (r.get<std::uint8_t>()) {
        PointResult p;
        const auto regime = r.get<std::int32_t>();
        if (regime < 0 || regime > static_cast<std::int32_t>(Regime::cycling))
            throw std::runtime_error("a sweep task's result names no regime");
        p.outcome.regime = static_cast<Regime>(regime);
        const auto n = r.get<std::uint64_t>();
        for (std::uint64_t k = 0; k < n; ++k) p.outcome.residents.push_back(r.get<std::int32_t>());
        const bool has_period = r.get<std::uint8_t>() != 0;
        const double period = r.get<double>();
        if (has_period) p.outcome.period = period;
        p.outcome.final_t_logK = r.get<double>();
        const auto m = r.get<std::uint64_t>();
        for (std::uint64_t k = 0; k < m; ++k) p.final_exponents.push_back(r.get<double>());
        o.result = std::move(p);
    }
    o.series = r.get_text();
    if (!r.at_end()) throw std::runtime_error("a sweep task's result has bytes past its end");
    return o;
}

}  // namespace tessera::cli
