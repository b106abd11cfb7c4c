#!/usr/bin/env bash
# Strong scaling of a lattice run over MPI ranks (docs/performance.md "Beyond one machine"):
# 256 x 256 patches at K = 1e6 (an invented scenario), 1 rank vs 2 ranks x 1 thread, in one
# session, alternating, the best of 2 rounds. The cost per step is the difference between a
# run of 1 + STEPS steps and a run of 1 step (start-up, inoculation, the outputs), / STEPS. Prints the
# bytes of migrant boxes each step exchanges, from the message sizes (fixed by the code:
# per halo row, width x directions x 2 compartments x traits x 8 bytes).
#
# usage: tests/bench/mpi_scaling.sh build/tessera [STEPS]
set -euo pipefail
tessera=$(realpath "$1") steps=${2:-20}
mpirun_bin=mpirun case=bench
source "$(dirname "${BASH_SOURCE[0]}")/../mpi/mpi_support.sh"  # launch=(mpirun ...)
work=$(mktemp -d) && trap 'rm -rf "$work"' EXIT && cd "$work"
W=256 H=256 T=4 dirs=4 sync=0.02
cat > big.toml <<TOML
title = "MPI scaling benchmark (invented)"
[traits]
dormancy = { max = 4.0, levels = 2 }
transfer = { max = 4.0, levels = 2 }
[rates]
dormancy_probability = 0.1
transfer = 2.0
migration = 0.4
[scale]
K = 1000000
[lattice]
width = $W
height = $H
neighbourhood = $dirs
boundary = "reflecting"
[[inoculum]]
where = "all"
trait = [0.0, 0.0]
exponent = 1.0
[[inoculum]]
where = "all"
trait = [4.0, 4.0]
active = 1000
[run]
time_unit = "plain"
sync = $sync
seed = 3
method = "auto"
[output]
every = 1000
TOML
one=$sync
until=$(awk -v s="$steps" -v d="$sync" 'BEGIN { printf "%.6g", (s + 1) * d }')
seconds() {  # seconds RANKS UNTIL: "wall CPU", CPU the most user time of any rank
    local start end
    uptime >&2
    rm -f cpu.*
    start=$(date +%s.%N)
    "${launch[@]}" -np "$1" sh -c '/usr/bin/time -f %U -o cpu.$OMPI_COMM_WORLD_RANK "$@"' rank \
        "$tessera" run big.toml --out "out-$1-$2" --quiet --threads 1 --set run.until="$2" --overwrite
    end=$(date +%s.%N)
    awk -v a="$start" -v b="$end" 'BEGIN { printf "%.3f ", b - a }'
    cat cpu.* | sort -g | tail -1
}
declare -A best cpu_best
for round in 1 2; do
    for n in 1 2; do
        for u in "$one" "$until"; do
            read -r t cpu <<< "$(seconds "$n" "$u")"
            echo "round $round: $n rank(s), until $u: $t s wall, busiest rank $cpu s CPU"
            key=$n:$u
            if [ -z "${best[$key]:-}" ] || awk -v a="$t" -v b="${best[$key]}" 'BEGIN { exit !(a < b) }'; then best[$key]=$t; fi
            if [ -z "${cpu_best[$key]:-}" ] || awk -v a="$cpu" -v b="${cpu_best[$key]}" 'BEGIN { exit !(a < b) }'; then cpu_best[$key]=$cpu; fi
        done
    done
done
cmp "out-1-$until/series.csv" "out-2-$until/series.csv" && echo "series.csv: the same bytes on 1 and 2 ranks"
awk -v s1="${best[1:$until]}" -v z1="${best[1:$one]}" -v s2="${best[2:$until]}" -v z2="${best[2:$one]}" \
    -v c1="${cpu_best[1:$until]}" -v y1="${cpu_best[1:$one]}" -v c2="${cpu_best[2:$until]}" -v y2="${cpu_best[2:$one]}" \
    -v steps="$steps" -v P=$((W * H)) -v W=$W -v T=$T -v dirs=$dirs 'BEGIN {
    a = (s1 - z1) / steps; b = (s2 - z2) / steps
    printf "wall per step: 1 rank %.3f s, 2 ranks %.3f s; speed-up %.2f\n", a, b, a / b
    a = (c1 - y1) / steps; b = (c2 - y2) / steps
    printf "CPU per step of the busiest rank: 1 rank %.3f s, 2 ranks %.3f s; ratio %.2f\n", a, b, a / b
    printf "compute per patch-step (1 rank, CPU): %.2f us\n", (c1 - y1) / steps / P * 1e6
    row = W * dirs * 2 * T * 8
    printf "halo bytes per step, 2 ranks: %d (2 messages of %d bytes, one row of boxes each)\n", 2 * row, row
}'
