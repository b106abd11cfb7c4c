// tessera sweep --merge DIR... --out DIR: joins the finished shards of one sweep (the same
// manifest but for --shard, every shard 1..N present once) into the files the unsharded
// sweep writes, byte for byte: each table's rows are grouped by their point and written in
// point order; the manifest and state are those of a whole sweep (--shard 1/1).
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <iterator>
#include <map>
#include <string>
#include <vector>

#include "cli/output_directory.hpp"
#include "cli/sweep_manifest.hpp"
#include "cli/sweep_runner.hpp"

namespace fs = std::filesystem;

namespace tessera::cli {

namespace {

const char* const tables[] = {"points.csv", "outcomes.csv", "final_exponents.csv", "summary.csv"};

std::string slurp(const fs::path& p, bool& ok) {
    std::ifstream in(p, std::ios::binary);
    ok = static_cast<bool>(in);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

}  // namespace

int merge_sweeps(const std::vector<std::string>& dirs, const std::string& out, bool overwrite, bool quiet) {
    if (out.empty()) {
        std::cerr << "error: --merge: --out DIR is required (the directory for the joined sweep)\n";
        return 2;
    }
    std::vector<SweepManifest> manifests;
    for (const std::string& d : dirs) {
        try {
            manifests.push_back(read_manifest(fs::path(d) / manifest_name));
            const SweepManifest& m = manifests.back();
            const SweepState s = read_state(fs::path(d) / state_name);
            const std::size_t expected = shard_points(m.points, m.shard_index, m.shard_count).size();
            if (s.points_done != expected) {
                std::cerr << "error: --merge " << d << ": shard " << m.shard_index << "/" << m.shard_count << " has "
                          << s.points_done << " of its " << expected
                          << " points; finish it first (tessera resume " << d << ")\n";
                return 2;
            }
        } catch (const std::runtime_error& e) {
            std::cerr << "error: --merge " << d << ": " << e.what() << "\n";
            return 2;
        }
    }
    const SweepManifest& first = manifests.front();
    std::vector<int> seen(static_cast<std::size_t>(first.shard_count) + 1, 0);
    for (std::size_t k = 0; k < manifests.size(); ++k) {
        if (!manifests[k].same_sweep(first)) {
            std::cerr << "error: --merge " << dirs[k] << ": not a shard of the same sweep as " << dirs[0]
                      << " (scenario, --set, --vary, --with, replicates, seed, settings or shard count differ)\n";
            return 2;
        }
        if (seen[static_cast<std::size_t>(manifests[k].shard_index)]++) {
            std::cerr << "error: --merge " << dirs[k] << ": shard " << manifests[k].shard_index << "/"
                      << first.shard_count << " is given twice\n";
            return 2;
        }
    }
    for (int i = 1; i <= first.shard_count; ++i) {
        if (!seen[static_cast<std::size_t>(i)]) {
            std::cerr << "error: --merge: shard " << i << "/" << first.shard_count << " is missing\n";
            return 2;
        }
    }

    const fs::path dir(out);
    if (!prepare_directory(dir, overwrite, {manifest_name, "outcomes.csv", "series.csv", "checkpoint.bin"})) return 2;
    SweepState state;
    state.points_done = first.points;
    for (const char* table : tables) {
        std::string header;
        std::map<std::size_t, std::string> rows;  // by point, in each shard's order within a point
        for (const std::string& d : dirs) {
            bool ok = false;
            const std::string text = slurp(fs::path(d) / table, ok);
            if (!ok) {
                std::cerr << "error: --merge " << d << ": " << table << " cannot be read\n";
                return 2;
            }
            const std::size_t eol = text.find('\n');
            const std::string head = text.substr(0, eol + 1);
            if (header.empty()) header = head;
            if (head != header) {
                std::cerr << "error: --merge " << d << ": " << table << " has another header than in " << dirs[0] << "\n";
                return 2;
            }
            std::size_t pos = eol + 1;
            while (pos < text.size()) {
                std::size_t end = text.find('\n', pos);
                if (end == std::string::npos) end = text.size() - 1;
                rows[std::strtoull(text.c_str() + pos, nullptr, 10)] += text.substr(pos, end + 1 - pos);
                pos = end + 1;
            }
        }
        std::string joined = header;
        for (const auto& [point, text] : rows) joined += text;
        if (!write_text(dir / table, joined)) {
            std::cerr << "error: cannot write " << (dir / table).string() << "\n";
            return 2;
        }
        const std::string name = table;
        if (name == "outcomes.csv") state.outcomes_bytes = joined.size();
        if (name == "final_exponents.csv") state.final_exponents_bytes = joined.size();
        if (name == "summary.csv") state.summary_bytes = joined.size();
    }
    if (first.keep_series) {
        for (const std::string& d : dirs) {
            std::error_code ec;
            fs::copy(fs::path(d) / "points", dir / "points",
                     fs::copy_options::recursive | fs::copy_options::overwrite_existing, ec);
            if (ec) {
                std::cerr << "error: --merge " << d << ": cannot copy its points/: " << ec.message() << "\n";
                return 2;
            }
        }
    }
    SweepManifest whole = first;
    whole.shard_index = whole.shard_count = 1;
    if (!write_manifest(dir / manifest_name, whole) || !write_state(dir / state_name, state)) {
        std::cerr << "error: cannot write the manifest in " << dir.string() << "\n";
        return 2;
    }
    if (!quiet) std::cout << first.shard_count << " shards of " << first.points << " points joined into " << dir.string() << "/\n";
    return 0;
}

}  // namespace tessera::cli
