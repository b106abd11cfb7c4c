// tessera: the command line. It parses options and calls one function per subcommand.
#include <CLI/CLI.hpp>

#include <exception>
#include <iostream>

#include "cli/commands.hpp"
#include "cli/render_commands.hpp"
#include "cluster/cluster.hpp"
#include "version.hpp"

int main(int argc, char** argv) {
    using namespace tessera::cli;
    // Under an MPI launcher, the processes of one run (docs/guide.md "Running on a cluster").
    const tessera::cluster::Launch launch(argc, argv);
    if (!launch.error().empty()) {
        std::cerr << "error: " << launch.error() << "\n";
        return 2;
    }
    // Every rank parses the same command and meets the same errors: rank 0 alone tells them
    // (a rank's own trouble, e.g. a timeout waiting for the others, still reaches stderr).
    if (tessera::cluster::rank() != 0) {
        std::cout.setstate(std::ios::badbit);
        std::cerr.setstate(std::ios::badbit);
    }
    CLI::App app{
        "tessera: stochastic simulation of bacterial populations with dormancy, conjugative\n"
        "transfer and mutation on a lattice of biofilm patches. A research model, not guidance\n"
        "for clinical or environmental decisions."};
    app.set_version_flag("--version", std::string("tessera ") + tessera::version + " (build " + tessera::build_id + ", " +
                                          tessera::cluster::build_description() + ")");
    app.require_subcommand(1);
    app.footer("Run 'tessera COMMAND --help' for the options of a command. Exit codes: 0 success, 2 bad input, 1 internal error.");

    RunOptions run;
    auto* run_cmd = app.add_subcommand("run", "Run a scenario headless and write its outputs to a directory");
    run_cmd->add_option("scenario", run.scenario, "Scenario file (TOML)")->required();
    run_cmd->add_option("--out", run.out, "Output directory (default: <scenario name>-run)");
    run_cmd->add_option("--set", run.sets, "Override a scenario key, e.g. --set rates.transfer=0 (repeatable)")
        ->type_name("KEY=VALUE");
    run_cmd->add_option("--seed", run.seed, "Random seed (overrides run.seed)");
    run_cmd->add_option("--threads", run.threads, "Worker threads, 0 = all cores (overrides run.threads)")
        ->check(CLI::NonNegativeNumber);
    run_cmd->add_option("--replicates", run.replicates, "Independent replicates, run in parallel (one after another under mpirun, each over every rank)")
        ->check(CLI::PositiveNumber);
    run_cmd->add_flag("--quiet", run.quiet, "No progress bar or messages");
    run_cmd->add_flag("--overwrite", run.overwrite, "Allow --out to name a directory that already holds a run");

    ResumeOptions resume;
    auto* resume_cmd = app.add_subcommand("resume", "Continue an interrupted run or sweep (bit for bit)");
    resume_cmd->add_option("run_dir", resume.run_dir, "Output directory of the interrupted 'tessera run' or 'tessera sweep'")->required();
    resume_cmd->add_option("--threads", resume.threads, "Worker threads, 0 = all cores (results do not depend on it)")
        ->check(CLI::NonNegativeNumber);
    resume_cmd->add_flag("--quiet", resume.quiet, "No progress bar or messages");

    CheckOptions check;
    auto* check_cmd = app.add_subcommand("check", "Validate a scenario and its map; print a summary and a cost estimate");
    check_cmd->add_option("scenario", check.scenario, "Scenario file (TOML)")->required();
    check_cmd->add_option("--set", check.sets, "Override a scenario key (repeatable)")->type_name("KEY=VALUE");

    PredictOptions predict;
    auto* predict_cmd = app.add_subcommand(
        "predict", "Theory beside a run: the K -> infinity exponent limit (one patch) or the deterministic model at this K");
    predict_cmd->add_option("scenario", predict.scenario, "Scenario file (TOML)")->required();
    predict_cmd->add_option("--model", predict.model,
                            "limit: exponents on the t / ln K scale as K -> infinity (one patch; the default there); "
                            "ode: the deterministic model in counts at the scenario's K, mutation as a source "
                            "(any lattice; the default there)")
        ->check(CLI::IsMember({"limit", "ode"}));
    predict_cmd->add_option("--set", predict.sets, "Override a scenario key (repeatable)")->type_name("KEY=VALUE");
    predict_cmd->add_option("--out", predict.out, "Output directory (default: <scenario name>-predict); may be a run's");
    predict_cmd->add_flag("--overwrite", predict.overwrite, "Replace an earlier prediction of the same model in --out");
    predict_cmd->add_flag("--quiet", predict.quiet, "Print nothing but errors");

    SweepOptions sweep;
    auto* sweep_cmd = app.add_subcommand(
        "sweep", "Run a scenario over a grid of parameter values; classify every point into regimes");
    sweep_cmd->footer(
        "Each point ends in a regime: extinct, resident (one trait leads), coexistence (several lead)\n"
        "or cycling (the leaders take turns; docs/model.md section 6).\n"
        "Each --vary names a scenario key (as --set does) and its values:\n"
        "  --vary rates.dormancy_probability=0:0.25:11     11 values from 0 to 0.25, ends included\n"
        "  --vary scale.K=log:1e3:1e6:4                    4 values evenly spaced in log: 1e3 1e4 1e5 1e6\n"
        "  --vary rates.transfer_form=frequency,density    the values listed\n"
        "Several --vary make a grid (every combination; the last axis changes fastest). Every point is\n"
        "checked as 'tessera check' would check it before anything runs. Example (the bundled\n"
        "regime ladder: cycling, coexistence, then one resident as p rises; docs/guide.md section 7):\n"
        "  tessera sweep maps/dormancy-ladder/scenario.toml --vary rates.dormancy_probability=0:0.24:13 \\\n"
        "      --with both --replicates 8 --out ladder\n"
        "writes points.csv, outcomes.csv (one row per replicate), final_exponents.csv and summary.csv\n"
        "(fractions per regime and per resident trait, with Wilson 95% intervals) as points finish.\n"
        "Ctrl-C keeps the finished points; 'tessera resume DIR' continues. Under mpirun the\n"
        "points and replicates are shared over the ranks and rank 0 writes the same files.");
    sweep_cmd->add_option("scenario", sweep.scenario, "Scenario file (TOML)");
    sweep_cmd->add_option("--vary", sweep.vary, "An axis: KEY=FROM:TO:N, KEY=log:FROM:TO:N or KEY=v1,v2,... (repeatable)")
        ->type_name("KEY=VALUES");
    sweep_cmd->add_option("--set", sweep.sets, "Override a scenario key at every point (repeatable)")->type_name("KEY=VALUE");
    sweep_cmd->add_option("--with", sweep.with,
                          "run: stochastic replicates; limit: the K -> infinity exponent limit (one patch); both. "
                          "Default: both where the limit applies, else run")
        ->check(CLI::IsMember({"limit", "run", "both"}));
    sweep_cmd->add_option("--replicates", sweep.replicates, "Stochastic replicates per point (default 10)")
        ->check(CLI::PositiveNumber);
    sweep_cmd->add_option("--seed", sweep.seed, "Base seed (default: run.seed); each point gets its own seed from it");
    sweep_cmd->add_option("--threads", sweep.threads, "Worker threads, 0 = all cores (results do not depend on it)")
        ->check(CLI::NonNegativeNumber);
    sweep_cmd->add_option("--shard", sweep.shard,
                          "Run only every N-th point, starting at point I-1 (I from 1 to N), for job arrays; "
                          "join the shards with --merge")
        ->type_name("I/N");
    sweep_cmd->add_option("--merge", sweep.merge, "Join the finished shard directories DIR... into --out")
        ->type_name("DIR")
        ->expected(1, -1);
    sweep_cmd->add_option("--out", sweep.out, "Output directory")->type_name("DIR");
    sweep_cmd->add_option("--eps", sweep.eps,
                          "A trait leads when its exponent is within EPS of 1 (or of the top trait's); default 0.1");
    sweep_cmd->add_option("--final-window", sweep.final_window,
                          "Fraction of a run, at its end, in which cycles are looked for; default 0.25");
    sweep_cmd->add_flag("--keep-series", sweep.keep_series, "Also write every point's series.csv in points/NNNN/");
    sweep_cmd->add_flag("--overwrite", sweep.overwrite, "Allow --out to name a directory that already holds outputs");
    sweep_cmd->add_flag("--quiet", sweep.quiet, "No progress line, no table at the end");

    DemoOptions demo;
    demo.program = argv[0];
    auto* demo_cmd = app.add_subcommand("demo", "Run the bundled demo scenario into ./tessera-demo/");
    demo_cmd->add_option("--out", demo.out, "Output directory");
    demo_cmd->add_option("--threads", demo.threads, "Worker threads, 0 = all cores")->check(CLI::NonNegativeNumber);
    demo_cmd->add_flag("--quiet", demo.quiet, "No progress bar or messages");

    RenderOptions render;
    auto* render_cmd = app.add_subcommand("render", "Draw the frames of a finished run from its fields.h5 (no display needed)");
    render_cmd->add_option("run_dir", render.run_dir, "Output directory of 'tessera run' (or 'tessera predict --model ode')")->required();
    render_cmd->add_option("--out", render.out, "Directory for frame_NNNNNN.png")->required();
    render_cmd->add_option("--fields", render.fields,
                           "Fields file in RUN_DIR to draw: fields.h5 (the run, default) or ode_fields.h5 (the "
                           "deterministic model of 'tessera predict --model ode')");
    render_cmd->add_option("--view", render.view, "What to show: trait, dormant, transfer, exponent, habitat, stress");
    render_cmd->add_option("--scale", render.scale, "Pixels per patch (default: output.frame_scale)")->check(CLI::PositiveNumber);
    render_cmd->add_option("--video", render.video, "Also make a video with ffmpeg (e.g. run.mp4)");
    render_cmd->add_option("--fps", render.fps, "Frames per second of the video")->check(CLI::PositiveNumber);

    PlotOptions plot;
    auto* plot_cmd = app.add_subcommand(
        "plot", "Draw a figure of a run (exponents against time) or of a sweep (regime map) as PNG, SVG or PDF");
    plot_cmd->add_option("dir", plot.dir, "Output directory of 'tessera run' or 'tessera sweep'")->required();
    plot_cmd->add_option("--out", plot.out, "Figure file; .png, .svg or .pdf (default: DIR/<what>.png, DIR/regimes.png for a sweep)");
    plot_cmd->add_option("--what", plot.what,
                         "exponents (default), counts (cells, log scale), habitats (exponents per habitat class), "
                         "dormant (fraction of cells dormant)");
    plot_cmd->add_option("--time", plot.time, "Time axis: logK (t / ln K, default) or plain (t)");
    plot_cmd->add_option("--traits", plot.traits, "Only these traits, as dormancy:transfer joined by commas, e.g. 0:0,2:4")
        ->type_name("LIST");
    plot_cmd->add_option("--size", plot.size, "Size in pixels (points for SVG and PDF), default 1200x750")->type_name("WxH");
    plot_cmd->add_option("--replicate-lines", plot.replicate_lines, "Also draw the first N replicates as thin lines")
        ->check(CLI::NonNegativeNumber)->type_name("N");
    plot_cmd->add_option("--panels", plot.panels, "One small panel per dormancy level (dormancy) or per habitat class (habitat)");

    ViewOptions view;
    auto* view_cmd = app.add_subcommand("view", "Watch a scenario live in a window; press H in the window for the keys");
    view_cmd->add_option("scenario", view.scenario, "Scenario file (TOML)")->required();
    view_cmd->add_option("--set", view.sets, "Override a scenario key (repeatable)")->type_name("KEY=VALUE");
    view_cmd->add_option("--record", view.record,
                         "Record frames (frame_NNNNNN.png, lattice and legend as shown) to DIR from the start; "
                         "R stops and restarts. Without it, R records to tessera-recording/")
        ->type_name("DIR");
    view_cmd->add_option("--view", view.view, "View to start with: trait, dormant, transfer, exponent, habitat, stress");
    view_cmd->add_option("--predict", view.predict,
                         "ode: overlay the deterministic model in counts at this K in the live plot (dotted), "
                         "computed before the window opens; the K -> infinity limit is dashed whenever it applies")
        ->check(CLI::IsMember({"ode"}));
    view_cmd->add_option("--frames", view.frames, "Close after this many drawn frames (for tests)")->check(CLI::NonNegativeNumber);
    view_cmd->add_option("--script", view.script,
                         "Scripted input, e.g. \"frames=60;key=V;key=Space;click=3,4;resize=900,640;screenshot=out.png;quit\"");

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        const int code = app.exit(e);
        return code == 0 ? 0 : 2;
    }

    try {
        if (*run_cmd) return run_command(run);
        if (*resume_cmd) return resume_command(resume);
        if (*check_cmd) return check_command(check);
        if (*predict_cmd) return predict_command(predict);
        if (*sweep_cmd) return sweep_command(sweep);
        if (*demo_cmd) return demo_command(demo);
        if (*render_cmd) return render_command(render);
        if (*plot_cmd) return plot_command(plot);
        if (*view_cmd) return view_command(view);
    } catch (const std::exception& e) {
        std::cerr << "internal error: " << e.what() << "\n";
        return 1;
    }
    return 2;
}
