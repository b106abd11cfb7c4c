// A run split into bands of rows (core/lattice_partition.hpp) gives the bytes of one
// process (validation.md V19, here without MPI): N "processes" are N threads in one
// program, each with its own Engine and its own copy of the lattice, joined by an in-memory
// LatticePartition that does what src/cluster does with MPI messages. Random streams keyed by
// patch and countered by step (Salmon et al. 2011, "Parallel random numbers: as easy as
// 1, 2, 3", SC11) make the series text and the final state equal byte for byte; any
// difference fails. Runs in the sanitizer builds too (the MPI tests do not).
#include <catch2/catch.hpp>
#include <tbb/global_control.h>

#include <algorithm>
#include <array>
#include <barrier>
#include <cstring>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "core/lattice_partition.hpp"
#include "run_support.hpp"

using namespace tessera;

namespace {

// What the threads of one split run share: a barrier and one published slot each.
struct Group {
    Group(int processes, bool periodic) : n(processes), periodic(periodic), sync(processes), slot(static_cast<std::size_t>(processes)), pair(slot.size()) {}
    int n;
    bool periodic;
    std::barrier<> sync;
    std::vector<void*> slot;
    std::vector<std::array<double, 2>> pair;
};

class ThreadPartition final : public LatticePartition {
public:
    ThreadPartition(Group& g, int rank, int height) : g_(g), rank_(rank) {
        starts_ = cut_bands(std::vector<double>(static_cast<std::size_t>(height), 0.0), g_.n);
        before_ = starts_;
    }
    int processes() const override { return g_.n; }
    int process() const override { return rank_; }
    RowBand band() const override { return band_of(rank_); }
    void rebalance(std::vector<double>& cost) override {
        publish(cost.data());
        std::vector<double> whole(cost.size());
        for (int q = 0; q < g_.n; ++q) {
            const RowBand b = band_of(q);
            const auto* from = static_cast<const double*>(g_.slot[static_cast<std::size_t>(q)]);
            std::copy(from + b.first, from + b.end, whole.begin() + b.first);
        }
        g_.sync.arrive_and_wait();
        cost = whole;
        before_ = starts_;
        starts_ = cut_bands(cost, g_.n);
        all_starts.push_back(starts_);
    }
    void exchange_rows(std::int64_t* data, std::size_t per_row) override {
        publish(data);
        const int height = starts_.back();
        for (int row : halo_rows(starts_, rank_, g_.periodic)) {
            const int q = band_of_row(starts_, row);
            const auto* from = static_cast<const std::int64_t*>(g_.slot[static_cast<std::size_t>(q)]);
            std::memcpy(data + halo_slot(band(), height, row) * per_row, from + halo_slot(band_of(q), height, row) * per_row,
                        per_row * sizeof *data);
        }
        g_.sync.arrive_and_wait();
    }
    void gather_rows(std::uint64_t* data, std::size_t per_row) override {
        publish(data);
        for (int q = 1; rank_ == 0 && q < g_.n; ++q) {  // the others' buffers hold their band only
            const auto* from = static_cast<const std::uint64_t*>(g_.slot[static_cast<std::size_t>(q)]);
            const RowBand b = band_of(q);
            std::copy(from, from + static_cast<std::size_t>(b.end - b.first) * per_row, data + static_cast<std::size_t>(b.first) * per_row);
        }
        g_.sync.arrive_and_wait();
    }
    void move_rows(const std::uint64_t* before, std::uint64_t* after, std::size_t per_row) override {
        publish(const_cast<std::uint64_t*>(before));
        const RowBand mine = band();
        for (int row = mine.first; before && row < mine.end; ++row) {
            const int q = band_of_row(before_, row);
            const auto* from = static_cast<const std::uint64_t*>(g_.slot[static_cast<std::size_t>(q)]) +
                               static_cast<std::size_t>(row - before_[static_cast<std::size_t>(q)]) * per_row;
            std::copy(from, from + per_row, after + static_cast<std::size_t>(row - mine.first) * per_row);
        }
        g_.sync.arrive_and_wait();
    }
    void sum(std::uint64_t* values, int count) override {
        publish(values);
        std::vector<std::uint64_t> total(static_cast<std::size_t>(count), 0);
        for (void* p : g_.slot)
            for (int i = 0; i < count; ++i) total[static_cast<std::size_t>(i)] += static_cast<const std::uint64_t*>(p)[i];
        g_.sync.arrive_and_wait();  // everyone has read before anyone writes
        std::copy(total.begin(), total.end(), values);
    }
    void agree(bool& stop, double& largest) override {
        g_.pair[static_cast<std::size_t>(rank_)] = {stop ? 1.0 : 0.0, largest};
        g_.sync.arrive_and_wait();
        double s = 0, l = largest;
        for (const auto& p : g_.pair) s = std::max(s, p[0]), l = std::max(l, p[1]);
        g_.sync.arrive_and_wait();
        stop = s > 0;
        largest = l;
    }
    std::vector<std::vector<int>> all_starts;  // every split this process made, in order

private:
    RowBand band_of(int q) const { return {starts_[static_cast<std::size_t>(q)], starts_[static_cast<std::size_t>(q) + 1]}; }
    void publish(void* p) {
        g_.slot[static_cast<std::size_t>(rank_)] = p;
        g_.sync.arrive_and_wait();
    }
    Group& g_;
    int rank_;
    std::vector<int> starts_, before_;
};

struct NoOutputs : Observer {
    void observe(const Engine&, unsigned) override {}
};

// 9 x 10 patches, every local event and migration, a wall across the middle rows with a gap,
// a corner of no cells; long enough for several rebalances (balance_every_steps).
Scenario banded(Boundary boundary, int neighbourhood, Method method) {
    Scenario s;
    s.K = 200;
    s.width = 9;
    s.height = 10;
    Habitat wall;
    wall.name = "wall";
    wall.symbol = "#";
    wall.capacity = 0.0;
    s.habitats = {Habitat{}, wall};
    s.habitat_of_patch.assign(90, 0);
    for (int col = 0; col < 8; ++col) s.habitat_of_patch[static_cast<std::size_t>(5 * 9 + col)] = 1;  // row 5
    for (int row = 0; row < 10; ++row) s.habitat_of_patch[static_cast<std::size_t>(row * 9 + 4)] = row == 2 ? 0 : 1;  // column 4
    s.rates.dormancy_probability = 0.2;
    s.rates.dormant_death = 0.1;
    s.rates.transfer = 3.0;
    s.rates.migration = 0.6;
    s.rates.migration_dormant = 0.1;
    Inoculum in;
    in.where = Inoculum::Where::rect;
    in.x0 = 0, in.y0 = 0, in.x1 = 2, in.y1 = 3;
    in.active = 150;
    in.dormant = 5;
    s.inocula = {in};
    s.boundary = boundary;
    s.neighbourhood = neighbourhood;
    s.method = method;
    s.time_unit = TimeUnit::plain;
    s.until = 8.0;
    s.output_every = 0.5;
    s.sync = 0.05;
    s.seed = 11;
    return s;
}

struct SplitRun {
    std::string series;                  // rank 0's observer
    Engine::State state;                 // rank 0's at the end (the others hold their band only)
    std::vector<std::vector<std::vector<int>>> splits;
    std::vector<std::array<std::size_t, 4>> held;  // every rank's: rows held, band, counts held
    std::vector<char> refused;                     // state() refused (ranks other than 0)
};

SplitRun split_run(const Scenario& s, int n) {
    Group g(n, s.boundary == Boundary::periodic);
    SplitRun out;
    out.splits.resize(static_cast<std::size_t>(n));
    out.held.resize(static_cast<std::size_t>(n));
    out.refused.assign(static_cast<std::size_t>(n), 0);
    std::vector<std::thread> threads;
    for (int r = 0; r < n; ++r) {
        threads.emplace_back([&, r] {
            ThreadPartition part(g, r, s.height);
            Engine e(s, 0, &part);
            runtest::CollectSeries series;
            NoOutputs none;
            if (r == 0) e.run(series); else e.run(none);
            if (r == 0) out.series = series.text;
            if (r == 0) {
                out.state = e.state();
            } else {  // Catch's assertions are not for threads: record, check after the join
                try {
                    (void)e.state();
                } catch (const std::logic_error&) {
                    out.refused[static_cast<std::size_t>(r)] = 1;
                }
            }
            const Lattice& l = e.lattice();
            out.held[static_cast<std::size_t>(r)] = {static_cast<std::size_t>(l.first_row()), static_cast<std::size_t>(l.end_row()),
                                                     static_cast<std::size_t>(part.band().first) * 1000 + static_cast<std::size_t>(part.band().end),
                                                     l.all_active().size()};
            out.splits[static_cast<std::size_t>(r)] = part.all_starts;
        });
    }
    for (auto& t : threads) t.join();
    return out;
}

// The validate mode checks the whole lattice after every step, so it runs one process only
// (the Engine refuses more).
#ifdef TESSERA_VALIDATE
constexpr int most_processes = 1;
#else
constexpr int most_processes = 4;
#endif

}  // namespace

TEST_CASE("bands of rows over 1 to 4 processes give one process's bytes", "[partition]") {
    tbb::global_control limit(tbb::global_control::max_allowed_parallelism, 2);
    struct Case { Boundary boundary; int neighbourhood; Method method; const char* name; };
    for (const Case& c : {Case{Boundary::periodic, 8, Method::exact, "periodic, 8 neighbours, exact"},
                          Case{Boundary::absorbing, 4, Method::leap, "absorbing, 4 neighbours, leap"},
                          Case{Boundary::reflecting, 8, Method::auto_select, "reflecting, 8 neighbours, auto"}}) {
        const Scenario s = banded(c.boundary, c.neighbourhood, c.method);
        Engine plain(s);
        runtest::CollectSeries series;
        plain.run(series);
        const Engine::State want = plain.state();
        REQUIRE(want.migrants > 0);
        if (c.boundary == Boundary::absorbing) REQUIRE(want.lost > 0);
        for (int n = 1; n <= most_processes; ++n) {
            INFO(c.name << ", " << n << " processes");
            const SplitRun got = split_run(s, n);
            CHECK(got.series == series.text);
            const Engine::State& st = got.state;  // rank 0 ends with the whole state
            CHECK(st.active == want.active);
            CHECK(st.dormant == want.dormant);
            CHECK(st.lost == want.lost);
            CHECK(st.migrants == want.migrants);
            CHECK(st.step == want.step);
            CHECK(std::memcmp(st.patch_counts.data(), want.patch_counts.data(),
                              want.patch_counts.size() * sizeof(EventCounts)) == 0);
            // Every other rank holds the counts of its own band's rows, no more.
            for (int r = 1; r < n; ++r) {
                const auto& h = got.held[static_cast<std::size_t>(r)];
                CHECK(h[0] * 1000 + h[1] == h[2]);
                CHECK(h[3] == (h[1] - h[0]) * static_cast<std::size_t>(s.width) * want.active.size() / want.patch_counts.size());
                CHECK(h[1] - h[0] < static_cast<std::size_t>(s.height));
                CHECK(got.refused[static_cast<std::size_t>(r)]);
            }
            for (int r = 1; r < n; ++r) CHECK(got.splits[static_cast<std::size_t>(r)] == got.splits[0]);  // same bands everywhere
            if (n > 1) CHECK(got.splits[0].size() > 3);  // rebalanced along the way
        }
    }
}

TEST_CASE("bands follow the cost; halo rows wrap only when periodic", "[partition]") {
    CHECK(cut_bands(std::vector<double>(10, 0.0), 3) == std::vector<int>{0, 3, 6, 10});
    CHECK(cut_bands(std::vector<double>(8, 1.0), 4) == std::vector<int>{0, 2, 4, 6, 8});
    // All the cost in rows 6 and 7: the cut falls between them; the empty rows go to band 0.
    CHECK(cut_bands({0, 0, 0, 0, 0, 0, 5, 5}, 2) == std::vector<int>{0, 7, 8});
    // Every band keeps at least one row, even when one row holds all the cost.
    CHECK(cut_bands({0, 0, 9, 0}, 4) == std::vector<int>{0, 1, 2, 3, 4});
    const std::vector<int> starts{0, 3, 6, 10};
    CHECK(halo_rows(starts, 0, false) == std::vector<int>{3});
    CHECK(halo_rows(starts, 0, true) == std::vector<int>{9, 3});
    CHECK(halo_rows(starts, 1, false) == std::vector<int>{2, 6});
    CHECK(halo_rows(starts, 2, true) == std::vector<int>{5, 0});
    CHECK(halo_rows({0, 10}, 0, true).empty());                 // one band wraps onto itself
    CHECK(halo_rows({0, 1, 2}, 0, true) == std::vector<int>{1});  // above and below are one row
    CHECK(band_of_row(starts, 0) == 0);
    CHECK(band_of_row(starts, 5) == 1);
    CHECK(band_of_row(starts, 9) == 2);
}
