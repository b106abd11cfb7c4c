#!/usr/bin/env bash
# Runs every fuzz target for a while (docs/reliability.md "Fuzzing").
#   tests/fuzz/run_fuzz.sh BUILD_DIR SECONDS_PER_TARGET [TARGET...]
# Each target starts from its seed corpus (tests/fuzz/corpus/<target>, read only) and writes
# what it finds to BUILD_DIR/fuzz-corpus/<target>; a crash, hang, leak or sanitizer report is
# saved as BUILD_DIR/fuzz-artifacts/<target>-crash-* and fails the script. Add such an input
# to the seed corpus once fixed: it then stays a regression case.
set -euo pipefail
cd "$(dirname "$0")/../.."
build=$1
seconds=$2
shift 2
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
  for t in scenario text_map image_map checkpoint; do
    [ -x "$build/tests/fuzz/fuzz_$t" ] && targets+=("$t")
  done
fi
mkdir -p "$build/fuzz-artifacts"
status=0
for t in "${targets[@]}"; do
  mkdir -p "$build/fuzz-corpus/$t"
  echo "== fuzz_$t for ${seconds} s"
  # -timeout: an input that takes 10 s is a hang; -rss_limit_mb: one that needs 2 GB is a
  # memory bomb (both count as failures). The summary lines give executions and coverage.
  if ! "$build/tests/fuzz/fuzz_$t" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
      -print_final_stats=1 -artifact_prefix="$build/fuzz-artifacts/$t-" \
      "$build/fuzz-corpus/$t" "tests/fuzz/corpus/$t" > "$build/fuzz-artifacts/$t.log" 2>&1; then
    echo "fuzz_$t FAILED; the last lines of its log:"
    tail -n 60 "$build/fuzz-artifacts/$t.log"
    status=1
  fi
  grep -E "^stat::(number_of_executed_units|peak_rss_mb)|^#[0-9]+ +DONE" "$build/fuzz-artifacts/$t.log" || true
done
exit $status
