#!/usr/bin/env bash
# tests/sweep_cli.sh — `overtone sweep` on cases/demo/sweep.yaml: cases, restart, shards, gather.
#
# Usage: sweep_cli.sh OVERTONE_BINARY SOURCE_DIR
# Expected behaviour from docs/sweeps.md: one folder per case with study.json and a `done` marker;
# a rerun studies nothing; shards K/N take the cases whose index % N == K-1 and together give the
# full set with the same bytes; summary.csv's columns, worst values and Monte-Carlo percentiles
# recomputed here from the cases' JSON with numpy (numpy.percentile's default linear rule); bad
# sweep files and options exit 2 with file:line:col and write nothing (PLANT-FORMAT.md "Errors").
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
SWEEP=$2/cases/demo/sweep.yaml
CASES="loading-100 loading-60 loading-80 mc-0001 mc-0002 mc-0003 mc-0004 pfc-b-off-new-line"

# 1. The whole sweep: a folder per case, study.json and the marker.
run full 0 "$BIN" sweep "$SWEEP" --out "$WORK/full" --threads 2
[ "$(ls "$WORK/full/cases" | sort | tr '\n' ' ')" = "$CASES " ] ||
  fail "full: case folders $(ls "$WORK/full/cases" | tr '\n' ' ')"
for c in $CASES; do
  [ -s "$WORK/full/cases/$c/study.json" ] || fail "full: $c has no study.json"
  [ -e "$WORK/full/cases/$c/done" ] || fail "full: $c has no done marker"
done
grep -q '^8 studied, 0 already done, 0 failed, of 8 cases' "$WORK/full.out" || fail "full: counts line"
grep -q 'screening study' "$WORK/full.out" || fail "full: no cautions"

# 2. A rerun studies nothing and leaves the results untouched.
before=$(stat -c %Y.%s "$WORK/full/cases/"*/study.json | md5sum)
run rerun 0 "$BIN" sweep "$SWEEP" --out "$WORK/full"
grep -q '^0 studied, 8 already done' "$WORK/rerun.out" || fail "rerun: $(tail -n 5 "$WORK/rerun.out")"
[ "$before" = "$(stat -c %Y.%s "$WORK/full/cases/"*/study.json | md5sum)" ] || fail "rerun rewrote results"
# An interrupted case (marker missing) is studied again, alone.
rm "$WORK/full/cases/mc-0002/done"
run resume 0 "$BIN" sweep "$SWEEP" --out "$WORK/full"
grep -q '^1 studied, 7 already done' "$WORK/resume.out" || fail "resume: $(tail -n 5 "$WORK/resume.out")"
grep -q '^case mc-0002: done' "$WORK/resume.out" || fail "resume: mc-0002 not restudied"

# 3. Two shards: disjoint, together the full set, the same bytes as the single run.
run shard1 0 "$BIN" sweep "$SWEEP" --out "$WORK/sharded" --shard 1/2 --threads 1
run shard2 0 "$BIN" sweep "$SWEEP" --out "$WORK/sharded" --shard 2/2 --threads 1
grep -q 'of 4 cases in shard 1/2' "$WORK/shard1.out" || fail "shard 1/2 does not hold 4 cases"
grep -q '^4 studied, 0 already done' "$WORK/shard2.out" || fail "shard 2/2 studied cases of shard 1"
[ "$(ls "$WORK/sharded/cases" | sort | tr '\n' ' ')" = "$CASES " ] || fail "shards: not the full set"
for c in $CASES; do
  cmp -s "$WORK/full/cases/$c/study.json" "$WORK/sharded/cases/$c/study.json" ||
    fail "shards: $c differs from the single run"
done
# Case index order (cases, loading levels, Monte-Carlo) splits 0,2,4,6 / 1,3,5,7.
for c in pfc-b-off-new-line loading-80 mc-0001 mc-0003; do
  grep -q "^case $c: done" "$WORK/shard1.out" || fail "shard 1/2 did not run $c"
done

# 4. The variations took effect (PLANT-FORMAT.md's study JSON).
/usr/bin/python3 - "$WORK/full/cases" <<'PY' || fail "variations not applied"
import json, sys
d = lambda c: json.load(open(f"{sys.argv[1]}/{c}/study.json"))
full, low = d("loading-100"), d("loading-60")
i1 = lambda r: {x["name"]: x["i1_a"] for x in r["drives"]}
# A group's fundamental current grows with its loading: 60 % below 100 % for every group.
assert all(i1(low)[n] < i1(full)[n] for n in i1(full)), "loading-60 not below loading-100"
# Monte-Carlo draws differ between cases.
assert i1(d("mc-0001")) != i1(d("mc-0002")), "two Monte-Carlo cases drew the same loadings"
# The bank out of service has no duty entry (duty covers banks with steps in service); the new group is studied.
x = d("pfc-b-off-new-line")
assert "PFC-B" not in [c["name"] for c in x["capacitors"]], "PFC-B still in service"
assert "PFC-B" in [c["name"] for c in full["capacitors"]], "PFC-B missing in the base"
assert "VFD-A1-NEW" in i1(x) and "VFD-A1-NEW" not in i1(full), "added group"
PY

# 5. Gather: the columns, worst values and Monte-Carlo percentiles recomputed from the JSON.
run gather 0 "$BIN" sweep --gather "$WORK/full"
/usr/bin/python3 - "$WORK/full" <<'PY' || fail "gather: summary.csv wrong"
import csv, json, os, sys
import numpy as np
root = sys.argv[1]
rows = list(csv.DictReader(open(f"{root}/summary.csv")))
assert list(rows[0].keys()) == ["quantity", "where", "worst_percent", "worst_case", "cases",
                                "montecarlo_cases", "p50_percent", "p95_percent"], rows[0].keys()
cases = sorted(os.listdir(f"{root}/cases"))
res = {c: json.load(open(f"{root}/cases/{c}/study.json")) for c in cases}
thd = {c: {b["name"]: b["thd_v_percent"] for b in r["buses"]} for c, r in res.items()}
buses = [b["name"] for b in res[cases[0]]["buses"]]
byrow = {(r["quantity"], r["where"]): r for r in rows}
assert len(rows) == len(buses) + 1, len(rows)
for b in buses:
    r = byrow[("thd_v", b)]
    worst = max(thd[c][b] for c in cases)
    assert abs(float(r["worst_percent"]) - worst) < 1e-3, (b, r, worst)
    assert abs(thd[r["worst_case"]][b] - worst) < 1e-9, (b, r["worst_case"])
    assert r["cases"] == "8" and r["montecarlo_cases"] == "4", r
    mc = [thd[c][b] for c in cases if c.startswith("mc-")]
    assert abs(float(r["p50_percent"]) - np.percentile(mc, 50)) < 1e-3, (b, r)
    assert abs(float(r["p95_percent"]) - np.percentile(mc, 95)) < 1e-3, (b, r)
pcc = res[cases[0]]["pcc"]["bus"]
r = byrow[("tdd", pcc)]
mc = [res[c]["pcc"]["tdd_percent"] for c in cases if c.startswith("mc-")]
assert abs(float(r["p95_percent"]) - np.percentile(mc, 95)) < 1e-3, r
assert abs(float(r["worst_percent"]) - max(x["pcc"]["tdd_percent"] for x in res.values())) < 1e-3, r
PY
grep -q '^gathered 8 cases' "$WORK/gather.out" || fail "gather: count line"

# 6. Bad input: located error, exit 2, nothing written.
cat >"$WORK/bad.yaml" <<EOF2
overtone_sweep: 1
plant: $2/cases/demo/plant.yaml
loading_levels: [60 %, 250 %]
montecarlo: {cases: 4, seed: 7, loadings: {min: 50 %, max: 100 %}}
cases:
  - name: x
    capacitors: {PFC-Z: 1}
EOF2
run bad 2 "$BIN" sweep "$WORK/bad.yaml" --out "$WORK/bad-out"
grep -q "bad.yaml:3:24: error: scaling by 250 %" "$WORK/bad.err" || fail "bad: level not located"
grep -q "bad.yaml:4:33: error: unknown key \`loadings\`" "$WORK/bad.err" || fail "bad: key not located"
grep -q "bad.yaml:7:18: error: no capacitor bank \`PFC-Z\`" "$WORK/bad.err" || fail "bad: bank not located"
[ -e "$WORK/bad-out" ] && fail "bad: wrote its output folder"
cat >"$WORK/bad-drive.yaml" <<EOF2
overtone_sweep: 1
plant: $2/cases/demo/plant.yaml
cases:
  - name: y
    add_drives:
      - {name: VFD-Q, bus: NO-SUCH-BUS, power: 11 kW}
EOF2
run bad_drive 2 "$BIN" sweep "$WORK/bad-drive.yaml" --out "$WORK/bad-out"
grep -q "bad-drive.yaml:6:7: error: in add_drives: .*NO-SUCH-BUS" "$WORK/bad_drive.err" ||
  fail "bad drive: $(cat "$WORK/bad_drive.err")"
run bad_shard 2 "$BIN" sweep "$SWEEP" --out "$WORK/bad-out" --shard 3/2
grep -q "3/2" "$WORK/bad_shard.err" || fail "bad shard: no message"
[ -e "$WORK/bad-out" ] && fail "bad: wrote its output folder"
run bad_gather 2 "$BIN" sweep --gather "$WORK/nothing-here"

cli_finish "sweep CLI"
