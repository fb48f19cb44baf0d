#!/usr/bin/env bash
# tests/synth_cli.sh — tools/synth's plant writer: deterministic from its seed, and its plants study.
#
# Usage: synth_cli.sh OVERTONE_BINARY SYNTH_BINARY
# Checks: the same seed gives byte-identical files (the generator's contract: mt19937_64 with its
# own portable mapping), another seed a different file; a 300-bus plant has exactly 300 buses and
# the asked drive groups and kinds, passes `overtone check` and `overtone study --no-scan` with
# exit 0 (PLANT-FORMAT.md "Exit status"), and every bus's V1 lies within 0.9..1.1 pu (the
# generator sizes transformers and feeders from their load for 0.95..1.05 pu; 0.9..1.1 pu is a
# common steady-state service range, checked here with a margin).
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SYNTH_BINARY" "$@"
BIN=$1
SYNTH=$2

"$SYNTH" --buses 300 --drives 60 --seed 11 --kinds 7 -o "$WORK/a.yaml" || fail "synth seed 11 exit $?"
"$SYNTH" --buses 300 --drives 60 --seed 11 --kinds 7 -o "$WORK/b.yaml" || fail "synth again exit $?"
"$SYNTH" --buses 300 --drives 60 --seed 12 --kinds 7 -o "$WORK/c.yaml" || fail "synth seed 12 exit $?"
cmp -s "$WORK/a.yaml" "$WORK/b.yaml" || fail "the same seed gave different files"
cmp -s "$WORK/a.yaml" "$WORK/c.yaml" && fail "seeds 11 and 12 gave the same file"

# Bad arguments: usage error, exit 2, no file.
status=0
"$SYNTH" --buses 3 --drives 1 -o "$WORK/bad.yaml" 2>"$WORK/bad.err" || status=$?
[ "$status" -eq 2 ] || fail "--buses 3: exit $status, expected 2"
[ -e "$WORK/bad.yaml" ] && fail "--buses 3 wrote a file"

# Counts as asked (parsed by PyYAML, independent of overtone's loader).
/usr/bin/python3 - "$WORK/a.yaml" <<'PY' || fail "a.yaml: counts"
import sys, yaml
d = yaml.safe_load(open(sys.argv[1]))
assert d["overtone"] == 1
assert len(d["buses"]) == 300, len(d["buses"])
assert len(d["drives"]) == 60, len(d["drives"])
kinds = {(x["front_end"], x["power"]) for x in d["drives"]}
assert len(kinds) == 7, kinds
conns = {t["connection"] for t in d["transformers"]}
assert {"Dd0", "Dyn11", "Dyn1"} <= conns, conns
assert any("detuning" in c for c in d["capacitors"]), "no detuned bank"
assert any("detuning" not in c for c in d["capacitors"]), "no plain bank"
assert d["motors"] and d["loads"], "motors and loads"
PY

status=0
"$BIN" check "$WORK/a.yaml" >"$WORK/check.out" 2>"$WORK/check.err" || status=$?
[ "$status" -eq 0 ] || fail "check: exit $status ($(head -c 400 "$WORK/check.err"))"
status=0
"$BIN" study "$WORK/a.yaml" --no-scan --json "$WORK/a.json" >"$WORK/study.out" 2>"$WORK/study.err" ||
  status=$?
[ "$status" -eq 0 ] || fail "study: exit $status ($(head -c 400 "$WORK/study.err"))"
/usr/bin/python3 - "$WORK/a.json" <<'PY' || fail "study: bus voltages outside 0.9..1.1 pu"
import json, sys
d = json.load(open(sys.argv[1]))
assert len(d["buses"]) == 300, len(d["buses"])
bad = [(b["name"], b["v1_pu"]) for b in d["buses"] if not 0.9 <= b["v1_pu"] <= 1.1]
assert not bad, bad[:10]
PY

# Results do not depend on the thread count (DESIGN.md section 5): the whole study with its
# resonance screening (driving points by selected inversion at this plant's capacitor buses),
# byte for byte on one thread and on two.
for threads in 1 2; do
  "$BIN" study "$WORK/a.yaml" --threads "$threads" --json "$WORK/t$threads.json" >/dev/null 2>&1 ||
    fail "study --threads $threads: exit $?"
done
cmp -s "$WORK/t1.json" "$WORK/t2.json" || fail "JSON on 1 and 2 threads differs"
grep -q '"resonances":\[{' "$WORK/t1.json" || fail "no resonance peaks screened"

cli_finish "synth CLI"
