#!/usr/bin/env bash
# A sweep shared over MPI ranks (src/cli/sweep_ranks.hpp) writes the bytes of one plain
# process, for any number of ranks and threads; a multi-rank sweep that is stopped resumes
# as a plain process to the same bytes; a silent rank ends the sweep with a message. Each
# replicate's random streams are keyed by (point seed, replicate, patch) (Salmon et al.
# 2011, "Parallel random numbers: as easy as 1, 2, 3", SC11), never by the rank or thread
# that runs it, so the check is a byte comparison (cmp): any difference fails.
#
# usage: sweep_ranks.sh MPIRUN TESSERA MAPS_DIR CASE WORK_DIR
set -euo pipefail
mpirun_bin=$1 tessera=$2 maps=$3 case=$4 work=$5
source "$(dirname "${BASH_SOURCE[0]}")/mpi_support.sh"
rm -rf "$work" && mkdir -p "$work" && cd "$work"

same() { same_files "$1" "$2"; }  # same DIR_A DIR_B: every file, the resolved scenario too

scenario=$maps/well-mixed/scenario.toml
# 8 points x 3 replicates of a small stochastic run, with the limit beside and every series kept.
small=(sweep "$scenario" --vary rates.dormancy_probability=0:0.25:4 --vary rates.transfer=1,3 --replicates 3
       --set scale.K=400 --set run.until=6 --keep-series --quiet)
# 8 points x 4 replicates, about 2 s as one process, to be stopped part way.
heavy=(sweep "$scenario" --vary rates.dormancy_probability=0:0.25:8 --replicates 4 --set scale.K=3000
       --set run.until=20 --keep-series --quiet)

case $case in
  stochastic)
    "$tessera" "${small[@]}" --out plain --threads 1
    "$tessera" "${small[@]}" --out plain2 --threads 2
    same plain plain2
    for plan in 1:1 2:1 3:1 2:2; do
        IFS=: read -r n threads <<< "$plan"
        ranks "$n" "${small[@]}" --out "np$n-t$threads" --threads "$threads"
        same plain "np$n-t$threads"
    done
    # A shard of the grid spread over the ranks is that shard's plain bytes.
    "$tessera" "${small[@]}" --out shard-plain --threads 1 --shard 2/3
    ranks 2 "${small[@]}" --out shard-np2 --threads 1 --shard 2/3
    same shard-plain shard-np2 ;;
  limit)
    # The K -> infinity limit alone: one quick task per point, spread too.
    limit=(sweep "$scenario" --vary rates.dormancy_probability=0:0.25:6 --vary rates.transfer=1,2,3 --with limit --quiet)
    "$tessera" "${limit[@]}" --out plain
    ranks 2 "${limit[@]}" --out np2 --threads 1
    same plain np2 ;;
  interrupted)
    "$tessera" "${small[@]}" --out plain --threads 1
    # Stopped by rank 0 after its 3rd written point (the test hook: as a Ctrl-C there), on
    # 3 ranks: every rank exits 130, 3 of the 8 points are written, and a plain resume ends
    # with the plain bytes.
    code=0
    TESSERA_SWEEP_STOP_AFTER=3 "${launch[@]}" -x TESSERA_SWEEP_STOP_AFTER -np 3 "$tessera" "${small[@]}" \
        --out hook --threads 1 2> hook.err || code=$?
    [ "$code" = 130 ] || { cat hook.err >&2; fail "$case: the stopped 3-rank sweep exited $code, not 130"; }
    grep -q "interrupted (SIGINT) after" hook.err || { cat hook.err >&2; fail "$case: rank 0 did not report the stop"; }
    grep -q "^points_done=3$" hook/sweep.state || fail "$case: sweep.state: $(cat hook/sweep.state)"
    "$tessera" resume hook --quiet
    same plain hook
    # SIGTERM to one rank only, the second started (harder than a scheduler's cancel, which
    # reaches every rank): the stop still reaches every rank, rank 0 names SIGTERM, 143.
    "$tessera" "${heavy[@]}" --out heavy-plain --threads 1
    "${launch[@]}" -np 2 "$tessera" "${heavy[@]}" --out term --threads 1 2> term.err &
    pid=$!
    wait_rows term/outcomes.csv 2
    kill -TERM "$(children "$pid" | sed -n 2p)"
    code=0
    wait "$pid" || code=$?
    [ "$code" = 143 ] || { cat term.err >&2; fail "$case: SIGTERM to rank 1: mpirun exited $code, not 143"; }
    grep -q "interrupted (SIGTERM) after" term.err || { cat term.err >&2; fail "$case: rank 0 did not report SIGTERM"; }
    "$tessera" resume term --quiet
    same heavy-plain term
    # SIGUSR1 to mpirun itself (what a batch script forwards: mpirun passes SIGUSR1 on and
    # waits, where it kills the ranks 1 s after passing on a SIGTERM): 143, resumable.
    "${launch[@]}" -np 2 "$tessera" "${heavy[@]}" --out usr1 --threads 1 2> usr1.err &
    pid=$!
    wait_rows usr1/outcomes.csv 2
    kill -USR1 "$pid"
    code=0
    wait "$pid" || code=$?
    [ "$code" = 143 ] || { cat usr1.err >&2; fail "$case: SIGUSR1 to mpirun: it exited $code, not 143"; }
    grep -q "interrupted (SIGUSR1) after" usr1.err || { cat usr1.err >&2; fail "$case: rank 0 did not report SIGUSR1"; }
    "$tessera" resume usr1 --quiet
    same heavy-plain usr1 ;;
  hung-rank)
    # A rank that stops answering (SIGSTOP) makes rank 0 give up after TESSERA_RANK_TIMEOUT
    # seconds with a message naming it; the points written so far resume to the same bytes.
    "$tessera" "${heavy[@]}" --out heavy-plain --threads 1
    TESSERA_RANK_TIMEOUT=2 "${launch[@]}" -x TESSERA_RANK_TIMEOUT -np 2 "$tessera" "${heavy[@]}" --out hung \
        --threads 1 2> hung.err &
    pid=$!
    wait_rows hung/outcomes.csv 2
    kill -STOP "$(children "$pid" | sed -n 2p)"
    code=0
    wait "$pid" || code=$?
    [ "$code" != 0 ] || fail "$case: the sweep with a stopped rank exited 0"
    grep -q "no word from rank [0-9]* for 2 s while running the sweep's points" hung.err ||
        { cat hung.err >&2; fail "$case: no timeout message"; }
    "$tessera" resume hung --quiet
    same heavy-plain hung ;;
  refusals)
    # --merge only joins files: refused under a launcher with exit 2 and a message why.
    "$tessera" "${small[@]}" --out one --shard 1/2 --threads 1
    code=0
    ranks 2 sweep --merge one --out merged --quiet 2> merge.err || code=$?
    [ "$code" = 2 ] || fail "--merge on 2 ranks exited $code, not 2"
    grep -q "does not run under an MPI launcher" merge.err || fail "--merge on 2 ranks: no clear message: $(cat merge.err)"
    [ ! -e merged ] || fail "--merge on 2 ranks wrote an output directory"
    # A directory that already holds a sweep is refused by rank 0, and every rank exits 2.
    code=0
    ranks 2 "${small[@]}" --out one --threads 1 2> again.err || code=$?
    [ "$code" = 2 ] || { cat again.err >&2; fail "a sweep into a used --out on 2 ranks exited $code, not 2"; } ;;
  *) fail "unknown case $case" ;;
esac
echo "ok: $case"
