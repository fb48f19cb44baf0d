#!/usr/bin/env bash
# tests/limits_cli.sh — the limit assessment through `overtone study`: Limits table, JSON
# assessment, --fail-on-violation (exit 3 after writing outputs), a bad profile file (exit 2,
# located error, nothing written). Exit statuses from PLANT-FORMAT.md "Exit status".
#
# Usage: limits_cli.sh OVERTONE_BINARY SOURCE_DIR
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
PLANTS=$2/tests/plants

# 1. The bench passes IEEE 519 (THDv 2.8 % < 8 %): exit 0 even with --fail-on-violation.
run pass 0 "$BIN" study "$PLANTS/spectrum-bench.yaml" --no-scan --fail-on-violation
grep -q '^Limits (IEEE Std 519-2014, profile ieee519)$' "$WORK/pass.out" || fail "pass: no Limits heading"
grep -q '^Violations: none$' "$WORK/pass.out" || fail "pass: violations reported"

# 2. The strict user profile fails: exit 3, and the JSON is still written in full.
run strict 3 "$BIN" study "$PLANTS/limits-strict.yaml" --no-scan --fail-on-violation --json "$WORK/strict.json"
[ -s "$WORK/strict.json" ] || fail "strict: no JSON written"
python3 - "$WORK/strict.json" <<'PY' || fail "strict: JSON assessment"
import json, sys
doc = json.load(open(sys.argv[1]))
a = doc["assessment"]
assert a["profile"] == "strict-test", a["profile"]
whats = {v["what"] for v in a["violations"]}
assert {"thd_v", "v_h5", "tdd", "i_h5"} <= whats, whats
assert a["design_guide"] == [], a["design_guide"]
thd = [v for v in a["violations"] if v["what"] == "thd_v"][0]
assert thd["limit"] == 2.0 and thd["value"] == doc["buses"][0]["thd_v_percent"], thd
h = [x for x in doc["pcc"]["harmonics"] if x["order"] == 5][0]
assert h["limit_percent"] == 1.0 and h["pass"] is False, h
assert doc["pcc"]["harmonics"][0]["limit_percent"] == 0.25  # order 2: even, 25 %
assert doc["pcc"]["tdd_limit_percent"] == 1.5
PY
grep -q 'FAIL' "$WORK/strict.out" || fail "strict: no FAIL in the Limits table"
run strict_plain 0 "$BIN" study "$PLANTS/limits-strict.yaml" --no-scan
grep -q ' FAIL$' "$WORK/strict_plain.out" || fail "strict: failures not marked in words"
if grep -q $'\x1b' "$WORK/strict_plain.out"; then fail "strict: colour codes written to a pipe"; fi
# Colour on a terminal only, never with --no-color.
check_terminal_colour strict FAIL "$BIN" study "$PLANTS/limits-strict.yaml" --no-scan

# 3. A profile file with an error: exit 2, file:line:col, no JSON left behind.
run broken 2 "$BIN" study "$PLANTS/bad/limits-broken.yaml" --json "$WORK/broken.json"
grep -q 'broken-profile.yaml:7:13: error: `thd` must be a number' "$WORK/broken.err" ||
  fail "broken: no located error ($(cat "$WORK/broken.err"))"
[ ! -e "$WORK/broken.json" ] || fail "broken: JSON written"
run broken_check 2 "$BIN" check "$PLANTS/bad/limits-broken.yaml"
grep -q 'broken-profile.yaml:7:13: error:' "$WORK/broken_check.err" || fail "broken: check does not read the profile"

cli_finish "limits CLI"
