# Shared by the multi-rank test scripts (same_bytes.sh, sweep_ranks.sh), sourced after they
# have read their arguments: the launcher, and the helpers that compare outputs and find
# the ranks. Needs $mpirun_bin, $tessera and $case.

launch=("$mpirun_bin" --oversubscribe)
[ "$(id -u)" = 0 ] && launch+=(--allow-run-as-root)
# Containers often forbid the cross-memory attach of Open MPI's shared-memory transport.
export OMPI_MCA_btl_vader_single_copy_mechanism=none

fail() { echo "FAIL: $*" >&2; exit 1; }
same_files() {  # same_files DIR_A DIR_B [SKIP ...]: every file but the SKIP names byte for byte, and no file more or less
    local a=$1 b=$2 f
    shift 2
    local skip=() name
    for name in "$@"; do skip+=(! -name "$name"); done
    for f in $(cd "$a" && find . -type f "${skip[@]}" | sort); do
        cmp "$a/$f" "$b/$f" || fail "$case: $b/$f differs from $a/$f"
    done
    [ "$(cd "$a" && find . -type f | wc -l)" = "$(cd "$b" && find . -type f | wc -l)" ] ||
        fail "$case: $b does not hold the same files as $a"
}
children() {  # children PID: the processes mpirun started, in order (from /proc: no procps needed)
    local target=$1 stat rest ppid
    for stat in /proc/[0-9]*/stat; do
        rest=$(cat "$stat" 2>/dev/null) || continue
        rest=${rest##*) }  # after "pid (comm) ": state, ppid, ...
        read -r _ ppid _ <<< "$rest"
        if [ "$ppid" = "$target" ]; then stat=${stat#/proc/}; echo "${stat%/stat}"; fi
    done | sort -n
}
ranks() {  # ranks N tessera-arguments...
    local n=$1; shift
    "${launch[@]}" -np "$n" "$tessera" "$@"
}
wait_rows() {  # wait_rows FILE N: until FILE has more than N lines (at most 10 s)
    for _ in $(seq 400); do
        [ -f "$1" ] && [ "$(wc -l < "$1")" -gt "$2" ] && return 0
        sleep 0.025
    done
    return 0
}
