// tessera resume RUN_DIR: continues an interrupted (or killed) run from its checkpoint.bin.
// The scenario comes from the checkpoint itself, never from files that may have changed
// since; the habitat map file is read again and must still give the same map.
#include <filesystem>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/run_session.hpp"
#include "io/checkpoint.hpp"
#include "io/scenario_loader.hpp"
#include "version.hpp"

namespace tessera::cli {

int resume_command(const ResumeOptions& o) {
    const std::filesystem::path dir(o.run_dir);
    std::error_code ec;
    if (!std::filesystem::is_directory(dir, ec)) {
        std::cerr << "error: " << dir.string() << ": not a directory; accepted: the --out directory of 'tessera run'\n";
        return 2;
    }
    // A sweep directory holds sweep.manifest; a run directory holds checkpoint.bin.
    if (std::filesystem::exists(dir / "sweep.manifest", ec)) return resume_sweep(o.run_dir, o.threads, o.quiet);
    const std::filesystem::path file = dir / "checkpoint.bin";
    Checkpoint checkpoint;
    try {
        checkpoint = read_checkpoint(file);
    } catch (const CheckpointError& e) {
        std::cerr << "error: " << e.what() << "\n";
        return 2;
    }
    Scenario scenario;
    try {
        scenario = parse_scenario(checkpoint.scenario_text, file.string() + " (its scenario)");
    } catch (const ScenarioError& e) {
        for (const Diagnostic& d : e.diagnostics()) std::cerr << "error: " << d.to_string() << "\n";
        std::cerr << "error: " << file.string() << ": its scenario no longer loads, so the run cannot be resumed\n";
        return 2;
    }
    if (scenario.habitat_of_patch != checkpoint.habitat_of_patch) {
        std::cerr << "error: " << file.string() << ": the habitat map "
                  << (scenario.map_path.empty() ? scenario.map : scenario.map_path)
                  << " has changed since the run started; restore it to resume the run\n";
        return 2;
    }
    if (o.threads) scenario.threads = *o.threads;
    if (!o.quiet && (checkpoint.program_version != version || checkpoint.build_id != build_id)) {
        std::cerr << "note: the run was started by tessera " << checkpoint.program_version << " (build "
                  << checkpoint.build_id << "); results may differ from an uninterrupted run of that version\n";
    }
    return resume_session(scenario, o.run_dir, checkpoint, {1, o.quiet, false});
}

}  // namespace tessera::cli
