#!/usr/bin/env bash
# tests/cli_robustness.sh — same input, same output; an unsolvable plant exits 4 and writes nothing.
#
# Usage: cli_robustness.sh OVERTONE_BINARY SOURCE_DIR
# Issue 8: `overtone study --json` on the demo plant is byte-identical across runs and across
# thread counts (DEVELOPERS.md "Results independent of the thread count"); a plant whose load flow
# collapses exits with status 4 naming the bus, and leaves no output (PLANT-FORMAT.md "Exit status").
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
SRC=$2

DEMO=$SRC/cases/demo/plant.yaml
for run in first second; do
  "$BIN" study "$DEMO" --json "$WORK/$run.json" >/dev/null || fail "study $run: exit status $?"
done
for threads in 1 2; do
  "$BIN" study "$DEMO" --threads "$threads" --json "$WORK/threads$threads.json" >/dev/null ||
    fail "study --threads $threads: exit status $?"
done
[ -s "$WORK/first.json" ] || fail "no JSON written"
for other in second threads1 threads2; do
  cmp -s "$WORK/first.json" "$WORK/$other.json" || fail "JSON of run '$other' differs from the first"
done

WEAK=$SRC/tests/edge/weak_supply.yaml
status=0
"$BIN" study "$WEAK" --json "$WORK/weak.json" >/dev/null 2>"$WORK/stderr" || status=$?
[ "$status" -eq 4 ] || fail "weak supply: exit status $status, expected 4"
grep -q "^error: .*load flow.*'WEAK'" "$WORK/stderr" || fail "weak supply: bus not named on stderr"
[ -e "$WORK/weak.json" ] && fail "weak supply: JSON written"

cli_finish "CLI robustness"
