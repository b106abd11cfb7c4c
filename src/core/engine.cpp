#include "core/engine.hpp"

#include <tbb/enumerable_thread_specific.h>
#include <tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <stdexcept>

#include "core/count_limit.hpp"
#include "core/exact_patch.hpp"
#include "core/exact_spatial.hpp"
#include "core/inoculum_cells.hpp"
#include "core/leap_patch.hpp"
#include "core/random_draws.hpp"
#include "core/rng.hpp"
#include "core/parallel.hpp"
#include "core/step_validator.hpp"

namespace tessera {

struct Engine::Scratch {
    tbb::enumerable_thread_specific<ExactPatch> exact;
    tbb::enumerable_thread_specific<LeapPatch> leap;
    // Migrants leaving each patch: [patch][direction][compartment][trait].
    std::vector<std::int64_t> outbox;
    std::vector<std::uint64_t> lost_per_patch;
    std::vector<std::uint64_t> sent_per_patch;
    std::vector<std::uint64_t> received_per_patch;  // immigrants, for the validate mode's books
    std::unique_ptr<ExactSpatial> spatial;  // method = "exact-spatial" only
    std::vector<PatchConditions> patch_conditions;

#ifdef TESSERA_VALIDATE
    std::optional<StepValidator> validator;  // docs/reliability.md "Validate mode"
#endif

    Scratch(const TraitGrid& g, const RateTable& r, double K) : exact(g, r, K), leap(g, r, K) {}
};

namespace {

bool has_cells(const std::int64_t* a, const std::int64_t* d, int traits) {
    for (int i = 0; i < traits; ++i) {
        if (a[i] != 0 || d[i] != 0) return true;
    }
    return false;
}

// The stream of the exact spatial engine, which draws for the whole lattice at once.
constexpr std::uint32_t lattice_stream = 0xFFFFFFFFu;

// Snap times that differ only by rounding, so that output times are met exactly.
bool reached(double t, double target) { return t >= target - 1e-12 * std::max(1.0, std::fabs(target)); }

}  // namespace

Engine::Engine(const Scenario& scenario, std::uint32_t replicate, LatticePartition* partition)
    : scenario_(scenario),
      traits_(scenario.dormancy_axis, scenario.transfer_axis),
      rates_(traits_, scenario.rates, scenario.K),
      lattice_(held_lattice(scenario, traits_.size(), partition)),
      timeline_(scenario_),
      neighbourhood_(scenario.width, scenario.height, scenario.neighbourhood, scenario.boundary),
      replicate_(replicate),
      patch_counts_(lattice_.held_patches()),
      scratch_(std::make_unique<Scratch>(traits_, rates_, scenario.K)) {
    if (scenario_.habitats.empty()) scenario_.habitats.push_back(Habitat{});
    if (scenario_.habitat_of_patch.size() != lattice_.patches()) {
        scenario_.habitat_of_patch.assign(lattice_.patches(), 0);
    }
    class_conditions_ = timeline_.at(0.0);
    partition_ = partition;
    band_ = partition_ ? partition_->band() : RowBand{0, lattice_.height()};
    inoculate();
    if (partition_) start_partition();
#ifdef TESSERA_VALIDATE
    scratch_->validator.emplace(scenario_.source_path, scenario_.seed, replicate_);
#endif
}

Engine::~Engine() = default;

double Engine::time_logK() const { return time_ / std::log(scenario_.K); }
double Engine::until() const { return scenario_.to_plain(scenario_.until); }

void Engine::inoculate() {
    const std::size_t first = lattice_.first_patch(), end = first + lattice_.held_patches();
    for_each_inoculum_cell(scenario_, traits_, class_conditions_, [&](std::size_t p, int trait, double active, double dormant) {
        if (p < first || p >= end) return;  // another process's band
        lattice_.active(p)[trait] += static_cast<std::int64_t>(std::llround(active));
        lattice_.dormant(p)[trait] += static_cast<std::int64_t>(std::llround(dormant));
    });
}

void Engine::run(Observer& observer, const std::atomic<bool>* stop, bool resumed) {
    const double end = until();
    const double every[3] = {scenario_.to_plain(scenario_.output_every),
                             scenario_.to_plain(scenario_.fields_every),
                             scenario_.to_plain(scenario_.frames_every)};
    std::uint64_t next[3] = {0, 0, 0};  // index j of the next output time j * every
    for (int k = 0; k < 3; ++k) {
        if (every[k] > 0) next[k] = static_cast<std::uint64_t>(std::floor(time_ / every[k] + 1e-9));
        // Resumed: skip the output times already reached (the checkpoint came after them).
        while (resumed && every[k] > 0 && reached(time_, static_cast<double>(next[k]) * every[k])) ++next[k];
    }
    if (resumed && reached(time_, end)) return;  // the final outputs are written too
    for (;;) {
        unsigned due = 0;
        for (int k = 0; k < 3; ++k) {
            if (every[k] > 0 && reached(time_, static_cast<double>(next[k]) * every[k])) {
                due |= 1u << k;
                ++next[k];
            }
        }
        const bool finished = reached(time_, end);
        if (finished) due |= series_output | (every[1] > 0 ? unsigned{fields_output} : 0u);
        if (due) {
            if (partition_ && shared_step_ != step_) share_state();
            observer.observe(*this, due);
        }
        if (finished || stop_agreed(stop)) {
            if (partition_ && shared_step_ != step_) share_state();  // state() sees every patch
            return;
        }
#ifdef TESSERA_VALIDATE
        if (scratch_->validator->stop_now()) return;  // TESSERA_STOP_AFTER_STEP
#endif

        double target = end;
        for (int k = 0; k < 3; ++k) {
            if (every[k] > 0) target = std::min(target, static_cast<double>(next[k]) * every[k]);
        }
        advance_to(target, stop);
        // Stopped between output times: nothing is due now, so the outputs are complete.
        const bool stopped = partition_ ? stop_agreed_ : stop && stop->load();
        if (stopped && !reached(time_, target)) {
            if (partition_ && shared_step_ != step_) share_state();
            return;
        }
    }
}

void Engine::advance_to(double t_end, const std::atomic<bool>* stop) {
    while (!reached(time_, t_end)) {
        if (!partition_ && stop && stop->load()) return;
        if (partition_ && stop_agreed_) return;
        double next = std::min({t_end, time_ + scenario_.sync, timeline_.next_change_after(time_)});
        if (reached(next, t_end)) next = t_end;
        // Never a step that could carry a patch past 2^62 cells: near the limit a long step
        // is cut short, or the run stops here with CellLimitError (core/count_limit.hpp).
        if (partition_) {
            // One agreement per step: the stop, and the fullest patch of any band.
            bool halt = stop && stop->load();
            double most = largest_patch_total(*this, static_cast<std::size_t>(band_.first) * lattice_.width(),
                                              static_cast<std::size_t>(band_.end) * lattice_.width());
            partition_->agree(halt, most);
            if (halt) {
                stop_agreed_ = true;
                return;
            }
            const auto end = step_end_below_limit(*this, next, most);
            if (!end) {
                share_state();  // so that process 0 sees every patch and names the fullest as it throws
                if (partition_->process() != 0)
                    throw CellLimitError("a patch could pass the cell limit in the next step (process 0 names it)",
                                         time_, 0, 0);
            }
            next = end ? *end : limit_step(*this, next);
        } else {
            next = limit_step(*this, next);
        }
#ifdef TESSERA_VALIDATE
        validate_before_step(next);
#endif
        step(next - time_);
        time_ = next;
        if (partition_ && step_ % balance_every_steps == 0) share_state();
#ifdef TESSERA_VALIDATE
        validate_after_step();
        if (scratch_->validator->stop_now()) return;
#endif
    }
    time_ = std::max(time_, t_end);
}

void Engine::step(double dt) {
    class_conditions_ = timeline_.at(time_);
    if (scenario_.method == Method::exact_spatial) {
        exact_spatial_step(dt);
        ++step_;
        return;
    }
    local_phase(dt);
    if (lattice_.patches() > 1 &&
        (scenario_.rates.migration > 0 || scenario_.rates.migration_dormant > 0)) {
        migration_phase(dt);
    }
    ++step_;
}

// The reference: one exact process over the whole lattice, serial, one random stream for the
// lattice (keyed by the patch number no patch has).
void Engine::exact_spatial_step(double dt) {
    Scratch& s = *scratch_;
    if (!s.spatial) s.spatial = std::make_unique<ExactSpatial>(traits_, rates_, scenario_);
    s.patch_conditions.resize(lattice_.patches());
    for (std::size_t p = 0; p < lattice_.patches(); ++p) s.patch_conditions[p] = conditions(p);
    Rng rng({scenario_.seed, replicate_, lattice_stream}, step_, Phase::local);
    ExactSpatial::Tally tally;
#ifdef TESSERA_VALIDATE
    // Per-patch books for the validate mode (zeroed in validate_before_step).
    tally.emigrated = &s.sent_per_patch;
    tally.immigrated = &s.received_per_patch;
    tally.lost_from = &s.lost_per_patch;
#endif
    s.spatial->advance(lattice_, s.patch_conditions, dt, rng, patch_counts_, tally);
    lost_ += tally.lost;
    migrants_ += tally.migrants;
}

void Engine::local_phase(double dt) {
    const int T = traits_.size();
    const StreamKey base{scenario_.seed, replicate_, 0};
    const std::size_t W = static_cast<std::size_t>(lattice_.width());
    const std::size_t held = lattice_.first_patch();
    parallel_for(band_.first * W, band_.end * W, [&](std::size_t p) {
        std::int64_t* a = lattice_.active(p);
        std::int64_t* d = lattice_.dormant(p);
        if (!has_cells(a, d, T)) return;  // idle patches cost a scan of their counts
        StreamKey key = base;
        key.patch = static_cast<std::uint32_t>(p);
        Rng rng(key, step_, Phase::local);
        LeapPatch& leap = scratch_->leap.local();
        if (scenario_.method == Method::leap ||
            (scenario_.method == Method::auto_select &&
             leap.total_rate(a, d, conditions(p)) * dt > auto_leap_events)) {
            leap.advance(a, d, conditions(p), dt, rng, patch_counts_[p - held]);
        } else {
            scratch_->exact.local().advance(a, d, conditions(p), dt, rng, patch_counts_[p - held]);
#ifdef TESSERA_VALIDATE
            scratch_->validator->kept_sums(scratch_->exact.local().check_kept_sums(), p, lattice_.width());
#endif
        }
    });
}

void Engine::migration_phase(double dt) {
    const int T = traits_.size();
    const int dirs = neighbourhood_.size();
    const std::size_t per_patch = static_cast<std::size_t>(dirs) * 2 * T;
    Scratch& s = *scratch_;
    // Only this band's patches are stepped, and only their books and boxes are kept: the
    // boxes in halo_slot() order, this band's rows with a row of room either side for the
    // boxes of the rows just outside it, filled by the exchange below (no other row is read).
    const std::size_t W = static_cast<std::size_t>(lattice_.width());
    const std::size_t first = band_.first * W, end = band_.end * W;
    const std::size_t rows = static_cast<std::size_t>(band_.end - band_.first);
    const int H = lattice_.height();
    s.outbox.resize((rows + 2) * W * per_patch);
    std::fill(s.outbox.begin() + static_cast<std::ptrdiff_t>(W * per_patch),
              s.outbox.begin() + static_cast<std::ptrdiff_t>((rows + 1) * W * per_patch), 0);
    // The books of the band's patches, [p - first].
    for (auto* books : {&s.lost_per_patch, &s.sent_per_patch, &s.received_per_patch}) books->assign(end - first, 0);
    const auto box_of = [&](std::size_t p) {
        if (p >= first && p < end) return s.outbox.data() + (p - first + W) * per_patch;  // most calls
        return s.outbox.data() + (halo_slot(band_, H, static_cast<int>(p / W)) * W + p % W) * per_patch;
    };
    const double rate[2] = {scenario_.rates.migration, scenario_.rates.migration_dormant};
    const StreamKey base{scenario_.seed, replicate_, 0};

    // Emigration: each patch writes only its own counts and its own outbox.
    parallel_for(first, end, [&](std::size_t p) {
        std::int64_t* counts[2] = {lattice_.active(p), lattice_.dormant(p)};
        if (!has_cells(counts[0], counts[1], T)) return;
        const PatchConditions& here = conditions(p);
        StreamKey key = base;
        key.patch = static_cast<std::uint32_t>(p);
        Rng rng(key, step_, Phase::emigration);
        std::int64_t* out = box_of(p);
        const int col = static_cast<int>(p % lattice_.width());
        const int row = static_cast<int>(p / lattice_.width());
        for (int c = 0; c < 2; ++c) {
            const double leave = -std::expm1(-rate[c] * here.permeability * dt);
            if (!(leave > 0)) continue;
            for (int i = 0; i < T; ++i) {
                if (counts[c][i] == 0) continue;
                const std::int64_t leaving = binomial(rng, counts[c][i], leave);
                if (leaving == 0) continue;
                // Split the leavers uniformly over the directions (a multinomial).
                std::int64_t towards[8];
                split_uniformly(rng, leaving, dirs, towards);
                for (int dir = 0; dir < dirs; ++dir) {
                    const std::int64_t n = towards[dir];
                    if (n == 0) continue;
                    const auto to = neighbourhood_.step(col, row, dir);
                    if (to.kind == Neighbourhood::Target::off_edge) {
                        if (scenario_.boundary != Boundary::absorbing) continue;  // reflected
                        counts[c][i] -= n;
                        s.lost_per_patch[p - first] += static_cast<std::uint64_t>(n);
                        continue;
                    }
                    if (conditions(static_cast<std::size_t>(to.patch)).capacity <= 0) continue;  // wall
                    counts[c][i] -= n;
                    out[(static_cast<std::size_t>(dir) * 2 + c) * T + i] += n;
                    s.sent_per_patch[p - first] += static_cast<std::uint64_t>(n);
                }
            }
        }
    });

    // The boxes of the rows next to the band, from the processes that step them.
    if (partition_) partition_->exchange_rows(s.outbox.data(), W * per_patch);

    // Immigration: each patch reads what its neighbours sent towards it, in direction order.
    parallel_for(first, end, [&](std::size_t q) {
        const int col = static_cast<int>(q % lattice_.width());
        const int row = static_cast<int>(q / lattice_.width());
        std::int64_t* counts[2] = {lattice_.active(q), lattice_.dormant(q)};
        for (int dir = 0; dir < dirs; ++dir) {
            const auto from = neighbourhood_.step(col, row, Neighbourhood::opposite(dir));
            if (from.kind != Neighbourhood::Target::patch) continue;
            const std::int64_t* box = box_of(static_cast<std::size_t>(from.patch));
            for (int c = 0; c < 2; ++c) {
                const std::int64_t* in = box + (static_cast<std::size_t>(dir) * 2 + c) * T;
                for (int i = 0; i < T; ++i) {
                    counts[c][i] += in[i];
                    s.received_per_patch[q - first] += static_cast<std::uint64_t>(in[i]);
                }
            }
        }
    });
    for (std::size_t p = 0; p < end - first; ++p) {
        lost_ += s.lost_per_patch[p];
        migrants_ += s.sent_per_patch[p];
    }
}

void Engine::release_step_buffers() {
    Scratch& s = *scratch_;
    for (auto* books : {&s.lost_per_patch, &s.sent_per_patch, &s.received_per_patch}) *books = {};
    s.outbox = {};
}

// --- checkpoints --------------------------------------------------------------------------
Engine::State Engine::state() const {
    if (!lattice_.whole())
        throw std::logic_error("Engine::state(): this process holds its band of rows only; process 0 holds the whole");
    return {time_, step_, lattice_.all_active(), lattice_.all_dormant(), patch_counts_, lost_, migrants_,
            class_conditions_};
}

void Engine::restore(const State& s) {
    const std::size_t T = static_cast<std::size_t>(lattice_.traits());
    const std::size_t cells = lattice_.patches() * T;
    if (s.active.size() != cells || s.dormant.size() != cells || s.patch_counts.size() != lattice_.patches() ||
        s.class_conditions.size() != class_conditions_.size()) {
        throw std::invalid_argument("the saved state does not fit this scenario's lattice, traits or habitats");
    }
    time_ = s.time;
    step_ = s.step;
    // The held rows only.
    const auto first = static_cast<std::ptrdiff_t>(lattice_.first_patch());
    const auto held = static_cast<std::ptrdiff_t>(lattice_.held_patches());
    const auto cell = static_cast<std::ptrdiff_t>(T);
    std::copy(s.active.begin() + first * cell, s.active.begin() + (first + held) * cell, lattice_.active(lattice_.first_patch()));
    std::copy(s.dormant.begin() + first * cell, s.dormant.begin() + (first + held) * cell, lattice_.dormant(lattice_.first_patch()));
    std::copy(s.patch_counts.begin() + first, s.patch_counts.begin() + first + held, patch_counts_.begin());
    lost_ = s.lost;
    migrants_ = s.migrants;
    class_conditions_ = s.class_conditions;
    if (partition_) start_partition();  // bands from the restored event counts
}
// ------------------------------------------------------------------------------------------

// --- validate mode (docs/reliability.md) ----------------------------------------------------
#ifdef TESSERA_VALIDATE
void Engine::validate_before_step(double t_next) {
    Scratch& s = *scratch_;
    s.validator->before(lattice_, patch_counts_, lost_, step_, time_, t_next);
    // A step without a migration phase moves nobody: its books read zero.
    s.lost_per_patch.assign(lattice_.patches(), 0);
    s.sent_per_patch.assign(lattice_.patches(), 0);
    s.received_per_patch.assign(lattice_.patches(), 0);
}

void Engine::validate_after_step() {
    Scratch& s = *scratch_;
    const MigrationBooks books{&s.sent_per_patch, &s.received_per_patch, &s.lost_per_patch};
    s.validator->after(lattice_, patch_counts_, lost_, &books, true);
    if (scenario_.method == Method::exact_spatial) {
        // Every patch's kept sums live across the whole step there: check them all.
        for (std::size_t p = 0; p < lattice_.patches(); ++p)
            s.validator->kept_sums(s.spatial->patch_engine(p).check_kept_sums(), p, lattice_.width());
    }
}
#endif
// ------------------------------------------------------------------------------------------

EventCounts Engine::totals() const {
    EventCounts sum;
    for (const EventCounts& c : patch_counts_) sum += c;
    return sum;
}

}  // namespace tessera
