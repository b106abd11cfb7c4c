#!/usr/bin/env bash
# Peak memory of each MPI rank against a plain process (docs/performance.md "Memory per
# rank"): an invented 512 x 512 lattice, 2 x 2 traits, 4 neighbours, a few cells in every
# patch (so that the bands, cut by cost, stay near equal; few cells keep the steps cheap),
# 30 steps, so that the bands are recut and rows change owner. Prints the peak resident set (VmHWM, from
# /usr/bin/time's "maximum resident set size") of the plain run and of every rank.
#
# usage: tests/bench/mpi_memory.sh build/tessera [RANKS] [SIZE]
set -euo pipefail
tessera=$(realpath "$1") ranks=${2:-2} n=${3:-512}
mpirun_bin=mpirun case=bench
source "$(dirname "${BASH_SOURCE[0]}")/../mpi/mpi_support.sh"  # launch=(mpirun ...)
work=$(mktemp -d) && trap 'rm -rf "$work"' EXIT && cd "$work"
cat > big.toml <<TOML
title = "MPI memory benchmark (invented)"
[traits]
dormancy = { max = 4.0, levels = 2 }
transfer = { max = 4.0, levels = 2 }
[rates]
dormancy_probability = 0.1
transfer = 2.0
migration = 0.4
[scale]
K = 1000
[lattice]
width = $n
height = $n
neighbourhood = 4
boundary = "periodic"
[[inoculum]]
where = "all"
trait = [0.0, 0.0]
active = 5
[run]
time_unit = "plain"
until = 0.6
sync = 0.02
seed = 3
method = "auto"
[output]
every = 0.3
TOML
/usr/bin/time -f %M -o rss.plain "$tessera" run big.toml --out plain --quiet --threads 1
"${launch[@]}" -np "$ranks" sh -c '/usr/bin/time -f %M -o rss.$OMPI_COMM_WORLD_RANK "$@"' rank \
    "$tessera" run big.toml --out split --quiet --threads 1
cmp plain/series.csv split/series.csv
echo "lattice ${n} x ${n}, 4 traits; peak resident set in MiB:"
awk '{ printf "plain process: %.1f\n", $1 / 1024 }' rss.plain
for r in $(seq 0 $((ranks - 1))); do awk -v r="$r" '{ printf "rank %d of '"$ranks"': %.1f\n", r, $1 / 1024 }' "rss.$r"; done
