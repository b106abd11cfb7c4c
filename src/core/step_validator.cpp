#include "core/step_validator.hpp"

#include <cstdlib>
#include <cstdio>

namespace tessera {

namespace {

// Lattice-wide totals: each patch stays below 2^62 cells (core/count_limit.hpp), but a
// lattice of them can hold more than 2^63.
__extension__ using wide = __int128;

std::string text(wide v) {
    if (v < 0) return "-" + text(-v);
    std::string digits;
    do {
        digits.insert(digits.begin(), static_cast<char>('0' + static_cast<int>(v % 10)));
        v /= 10;
    } while (v > 0);
    return digits;
}

std::int64_t population(const Lattice& lattice, std::size_t p) {
    std::int64_t n = 0;
    const std::int64_t* a = lattice.active(p);
    const std::int64_t* d = lattice.dormant(p);
    for (int i = 0; i < lattice.traits(); ++i) n += a[i] + d[i];
    return n;
}

// Cells that entered minus cells that left by local events (as signed 64-bit: the tallies
// of one step stay far below 2^63).
std::int64_t local_change(const EventCounts& now, const EventCounts& before) {
    const auto d = [](std::uint64_t a, std::uint64_t b) { return static_cast<std::int64_t>(a - b); };
    return d(now.births, before.births) - d(now.deaths, before.deaths) -
           d(now.competition_deaths, before.competition_deaths) - d(now.dormant_deaths, before.dormant_deaths);
}

std::optional<std::uint64_t> stop_after_from_environment() {
    const char* v = std::getenv("TESSERA_STOP_AFTER_STEP");
    if (!v || !*v) return std::nullopt;
    char* end = nullptr;
    const unsigned long long n = std::strtoull(v, &end, 10);
    if (*end != '\0') throw ValidationFailure(std::string("TESSERA_STOP_AFTER_STEP is \"") + v + "\"; accepted: a step number");
    return n;
}

}  // namespace

StepValidator::StepValidator(std::string scenario_file, std::uint64_t seed, std::uint32_t replicate)
    : scenario_file_(std::move(scenario_file)),
      seed_(seed),
      replicate_(replicate),
      stop_after_(stop_after_from_environment()) {}

void StepValidator::before(const Lattice& lattice, const std::vector<EventCounts>& counts, std::uint64_t lost,
                           std::uint64_t step, double t0, double t1) {
    step_ = step;
    t0_ = t0;
    t1_ = t1;
    lost_before_ = lost;
    population_before_.resize(lattice.patches());
    for (std::size_t p = 0; p < lattice.patches(); ++p) population_before_[p] = population(lattice, p);
    counts_before_ = counts;
}

void StepValidator::after(const Lattice& lattice, const std::vector<EventCounts>& counts, std::uint64_t lost_total,
                          const MigrationBooks* migration, bool per_patch_books) {
    const int W = lattice.width();
    const std::size_t P = lattice.patches();
    wide total_before = 0, total_now = 0, total_local = 0;
    std::uint64_t sent = 0, received = 0;
    for (std::size_t p = 0; p < P; ++p) {
        const std::int64_t* a = lattice.active(p);
        const std::int64_t* d = lattice.dormant(p);
        for (int i = 0; i < lattice.traits(); ++i) {
            if (a[i] < 0 || d[i] < 0)
                fail(p, W, "trait " + std::to_string(i) + " has " + std::to_string(a[i]) + " active and " +
                               std::to_string(d[i]) + " dormant cells: a count is negative");
        }
        const std::int64_t now = population(lattice, p);
        const std::int64_t local = local_change(counts[p], counts_before_[p]);
        std::int64_t in = 0, out = 0, lost = 0;
        if (migration) {
            in = static_cast<std::int64_t>((*migration->immigrated)[p]);
            out = static_cast<std::int64_t>((*migration->emigrated)[p]);
            lost = static_cast<std::int64_t>((*migration->lost)[p]);
            sent += (*migration->emigrated)[p];
            received += (*migration->immigrated)[p];
        }
        if (per_patch_books && population_before_[p] + local + in - out - lost != now) {
            fail(p, W, "the books do not balance: before " + std::to_string(population_before_[p]) + " + born - died " +
                           std::to_string(local) + " + immigrated " + std::to_string(in) + " - emigrated " +
                           std::to_string(out) + " - lost " + std::to_string(lost) + " = " +
                           std::to_string(population_before_[p] + local + in - out - lost) + ", but the patch holds " +
                           std::to_string(now));
        }
        total_before += population_before_[p];
        total_now += now;
        total_local += local;
    }
    if (migration && sent != received)
        fail(std::nullopt, W, std::to_string(sent) + " cells emigrated but " + std::to_string(received) + " immigrated");
    const auto lost = static_cast<std::int64_t>(lost_total - lost_before_);
    if (total_before + total_local - lost != total_now)
        fail(std::nullopt, W, "the lattice's books do not balance: before " + text(total_before) + " + born - died " +
                                  text(total_local) + " - lost " + std::to_string(lost) + " = " +
                                  text(total_before + total_local - lost) + ", but it holds " + text(total_now));
    if (stop_now())
        std::fprintf(stderr, "validate: stopped after step %llu of replicate %u as TESSERA_STOP_AFTER_STEP asks; "
                             "every check passed\n",
                     static_cast<unsigned long long>(step_), static_cast<unsigned>(replicate_));
}

void StepValidator::kept_sums(const std::string& problem, std::size_t patch, int width) const {
    if (!problem.empty()) fail(patch, width, "the exact engine's kept sums differ from a recomputation: " + problem);
}

void StepValidator::fail(std::optional<std::size_t> patch, int width, const std::string& what) const {
    std::string where = "validate: step " + std::to_string(step_) + " (plain time " + std::to_string(t0_) + " to " +
                        std::to_string(t1_) + "), seed " + std::to_string(seed_) + ", replicate " +
                        std::to_string(replicate_);
    if (patch) {
        const auto w = static_cast<std::size_t>(width);
        where += ", patch " + std::to_string(*patch) + " (X=" + std::to_string(*patch % w) +
                 ", Y=" + std::to_string(*patch / w) + ")";
    }
    throw ValidationFailure(where + ": " + what + "\nRe-run just this step (a TESSERA_VALIDATE build): " +
                            "TESSERA_STOP_AFTER_STEP=" + std::to_string(step_) + " tessera run " + scenario_file_ +
                            " --seed " + std::to_string(seed_) + " --replicates " + std::to_string(replicate_ + 1) +
                            " --out rerun --overwrite, with the run's --set options if any, or on the run's "
                            "scenario.resolved.toml (it checks every step up to " + std::to_string(step_) +
                            " and stops there)");
}

}  // namespace tessera
