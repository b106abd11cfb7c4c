#!/usr/bin/env bash
# V19 (validation.md): a run split over 1..4 MPI ranks writes the bytes of one plain
# process, and a run interrupted on some number of ranks resumes on another to the bytes of
# an uninterrupted run. Random streams keyed by patch and countered by step (Salmon et al.
# 2011, "Parallel random numbers: as easy as 1, 2, 3", SC11) make this exact, so the check
# is a byte comparison (cmp): any difference fails.
#
# usage: same_bytes.sh MPIRUN TESSERA MAPS_DIR CASE WORK_DIR
set -euo pipefail
mpirun_bin=$1 tessera=$2 maps=$3 case=$4 work=$5
source "$(dirname "${BASH_SOURCE[0]}")/mpi_support.sh"
rm -rf "$work" && mkdir -p "$work" && cd "$work"

# same DIR_A DIR_B [SKIP]: every output file byte for byte; scenario.resolved.toml records
# the thread count, and checkpoint.bin holds the state, so a caller may skip it.
same() { same_files "$1" "$2" scenario.resolved.toml ${3:+"$3"}; }

case $case in
  tube-wall | soil-periodic-exact | soil-absorbing-leap | replicates)
    case $case in
      tube-wall)  # auto method, 4-neighbourhood, walls across the bands, a schedule, frames
        scenario=$maps/tube-wall/scenario.toml
        set=(--set run.until=0.6 --set output.fields_every=0.2 --set output.frames_every=0.3) ;;
      soil-periodic-exact)  # periodic wrap across the first and last band, 8-neighbourhood
        scenario=$maps/soil-crumb/scenario.toml
        set=(--set run.method=exact --set run.until=0.6 --set output.fields_every=0.2 --set output.frames_every=0) ;;
      soil-absorbing-leap)  # cells lost through the edges, the leap engine at K = 1e5
        scenario=$maps/soil-crumb/scenario.toml
        set=(--set run.method=leap --set lattice.boundary=absorbing --set scale.K=100000 --set run.until=0.4
             --set output.fields_every=0.2 --set output.frames_every=0) ;;
      replicates)  # replicates one after another, each over every rank
        scenario=$maps/tube-wall/scenario.toml
        set=(--replicates 2 --set run.until=0.4 --set output.fields_every=0.2 --set output.frames_every=0) ;;
    esac
    "$tessera" run "$scenario" --out plain --quiet --threads 1 "${set[@]}"
    # Threads per rank change nothing either (but are recorded in checkpoint.bin's scenario).
    "$tessera" run "$scenario" --out plain2 --quiet --threads 2 "${set[@]}"
    same plain plain2 checkpoint.bin
    for n in 1 2 3 4; do
        threads=1 reference=plain
        [ "$n" = 2 ] && threads=2 reference=plain2
        ranks "$n" run "$scenario" --out "np$n" --quiet --threads "$threads" "${set[@]}"
        same "$reference" "np$n"
    done ;;
  interrupted)
    # 3 ranks stopped by SIGTERM to mpirun (which passes it on and gives the ranks 1 s before
    # its SIGKILL; mpirun itself then exits 1), resumed on 2 ranks; 4 ranks stopped by
    # SIGTERM to every rank (as a scheduler does; mpirun then exits with the ranks' 143),
    # resumed as one plain process; 2 ranks stopped by SIGUSR1 to mpirun (which passes it on
    # and waits: the ranks stop as for SIGTERM, and mpirun exits with their 143), resumed on 3
    # ranks. Each must end with the bytes of an uninterrupted run.
    scenario=$maps/tube-wall/scenario.toml
    set=(--set run.until=2.0 --set output.fields_every=0.25 --set output.frames_every=0.5)
    "$tessera" run "$scenario" --out plain --quiet "${set[@]}"
    for plan in 3:2:launcher 4:0:ranks 2:3:usr1; do
        IFS=: read -r from to target <<< "$plan"
        dir=stop$from
        "${launch[@]}" -np "$from" "$tessera" run "$scenario" --out "$dir" --quiet "${set[@]}" 2> "$dir.err" &
        pid=$!
        # Wait until the run is under way (its series has rows past t = 0), then stop it, early:
        # the split run is fast (the whole run takes about a second), and it must not finish first.
        wait_rows "$dir/series.csv" 12
        case $target in
          launcher) kill -TERM "$pid" ;;
          usr1) kill -USR1 "$pid" ;;
          ranks) kill -TERM $(children "$pid") ;;
        esac
        code=0
        wait "$pid" || code=$?
        [ "$code" != 0 ] || fail "$case: the $from-rank run was not interrupted (it finished first)"
        if [ "$target" != launcher ]; then
            [ "$code" = 143 ] || { cat "$dir.err" >&2; fail "$case: $target: mpirun exited $code, not 143"; }
            signal=SIGTERM
            [ "$target" = usr1 ] && signal=SIGUSR1
            grep -q "interrupted ($signal)" "$dir.err" || { cat "$dir.err" >&2; fail "$case: $target: rank 0 did not report the interrupt"; }
        fi
        if [ "$to" = 0 ]; then
            "$tessera" resume "$dir" --quiet
        else
            ranks "$to" resume "$dir" --quiet
        fi
        rm -f "$dir.err"
        same plain "$dir"
    done ;;
  hung-rank)
    # A rank that stops answering (SIGSTOP) makes the others give up after
    # TESSERA_RANK_TIMEOUT seconds with a message naming what they waited for, instead of
    # waiting for ever; the run then resumes from its last checkpoint to the same bytes.
    scenario=$maps/tube-wall/scenario.toml
    set=(--set run.until=1.5 --set output.fields_every=0.25 --set output.frames_every=0)
    "$tessera" run "$scenario" --out plain --quiet "${set[@]}"
    TESSERA_RANK_TIMEOUT=2 "${launch[@]}" -x TESSERA_RANK_TIMEOUT -np 3 "$tessera" run "$scenario" --out hung --quiet \
        "${set[@]}" 2> hung.err &
    pid=$!
    wait_rows hung/series.csv 12
    kill -STOP "$(children "$pid" | sed -n 2p)"
    code=0
    wait "$pid" || code=$?
    [ "$code" != 0 ] || fail "$case: the run with a stopped rank exited 0"
    grep -q "no word from the other ranks for 2 s" hung.err || { cat hung.err >&2; fail "$case: no timeout message"; }
    ranks 2 resume hung --quiet
    same plain hung ;;
  refusals)
    # exact-spatial is serial: refused on 2 ranks with exit 2 and a message that says why.
    set +e
    ranks 2 run "$maps/tube-wall/scenario.toml" --out spatial --quiet --set run.method=exact-spatial 2> spatial.err
    code=$?
    ranks 3 run "$maps/well-mixed/scenario.toml" --out rows --quiet 2> rows.err
    code_rows=$?
    set -e
    [ "$code" = 2 ] || fail "exact-spatial on 2 ranks exited $code, not 2"
    grep -q "serial by nature" spatial.err || fail "exact-spatial on 2 ranks: no clear message: $(cat spatial.err)"
    [ ! -e spatial ] || fail "exact-spatial on 2 ranks wrote an output directory"
    [ "$code_rows" = 2 ] || fail "a 1-row lattice on 3 ranks exited $code_rows, not 2"
    grep -q "too few to give each" rows.err || fail "a 1-row lattice on 3 ranks: no clear message: $(cat rows.err)" ;;
  cell-limit)
    # A population without bound stops at the cell limit (docs/reliability.md): on 2 and 3
    # ranks rank 0, which holds every patch once the bands are gathered, names the same patch
    # and writes the same outputs and checkpoint as a plain run, exit code 2; the other ranks
    # hold their band only and stop with it.
    printf '%s\n' '[rates]' 'competition = 0' 'migration = 0.5' '[scale]' 'K = 1e4' '[lattice]' 'width = 3' \
        'height = 4' 'boundary = "periodic"' '[[inoculum]]' 'where = "patch:2,1"' 'trait = [0.0, 0.0]' 'active = 100' \
        '[run]' 'until = 6' > unbounded.toml
    set +e
    "$tessera" run unbounded.toml --out plain --quiet 2> plain.err
    code_plain=$?
    set -e
    [ "$code_plain" = 2 ] || fail "$case: the plain run exited $code_plain, not 2"
    for n in 2 3; do
        set +e
        ranks "$n" run unbounded.toml --out "np$n" --quiet 2> "np$n.err"
        code=$?
        set -e
        [ "$code" = 2 ] || { cat "np$n.err" >&2; fail "$case: $n ranks exited $code, not 2"; }
        grep -qF "$(head -1 plain.err)" "np$n.err" || { cat "np$n.err" >&2; fail "$case: $n ranks: not the plain run's message"; }
        same plain "np$n"
    done ;;
  *) fail "unknown case $case" ;;
esac
echo "ok: $case"
