#!/usr/bin/env bash
# tests/spectrum_cli.sh — `overtone spectrum` through the CLI: table, JSON, waveform CSV, SVG, errors.
#
# Usage: spectrum_cli.sh OVERTONE_BINARY SOURCE_DIR
# Runs on tests/plants/spectrum-bench.yaml (a diode-capacitor group BENCH-VSD and a measured group
# BENCH-TABLE). Expected values come from PLANT-FORMAT.md (drive entry keys, "Exit status",
# "Conventions": a table order h sits at angle(table) + h angle(I1)) and from the bridge model's
# sampling grid (src/bridge.cc: 1440 samples per period, a 0.25 degree grid).
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
PLANT=$2/tests/plants/spectrum-bench.yaml

# 1. A bridge group: table, JSON, one period of CSV, a chart.
run bridge 0 "$BIN" spectrum "$PLANT" --drive BENCH-VSD --json "$WORK/vsd.json" \
  --waveform "$WORK/vsd.csv" --svg "$WORK/vsd.svg"
grep -Eq '^order +A +% of I1 +angle deg$' "$WORK/bridge.out" || fail "bridge: no spectrum table header"
grep -Eq '^DC voltage \(mean\) [0-9.]+ V' "$WORK/bridge.out" || fail "bridge: no DC voltage line"
grep -Eq '^Conduction angle [0-9.]+ deg' "$WORK/bridge.out" || fail "bridge: no conduction angle line"
grep -q 'screening study' "$WORK/bridge.out" || fail "bridge: no cautions"
# The drive entry of PLANT-FORMAT.md's study JSON, alone; harmonics for every order 2..max_order (50).
python3 - "$WORK/vsd.json" <<'EOF' || fail "bridge: --json output is not the drive entry"
import json, sys
d = json.load(open(sys.argv[1]))
for key in ("name", "bus", "count", "front_end", "i1_a", "i1_angle_deg", "thd_i_percent", "vdc_v",
            "ipeak_a", "conduction_deg", "harmonics"):
    assert key in d, key
assert d["name"] == "BENCH-VSD" and d["bus"] == "BENCH-480" and d["count"] == 4, d
assert d["front_end"] == "diode-capacitor", d["front_end"]
assert [h["order"] for h in d["harmonics"]] == list(range(2, 51)), "orders"
assert all(set(h) == {"order", "amps", "percent", "angle_deg"} for h in d["harmonics"]), "harmonic keys"
EOF
# One period on the 0.25 degree grid: 1440 rows, theta rising by 0.25 deg, 360 deg in all.
python3 - "$WORK/vsd.csv" <<'EOF' || fail "bridge: --waveform CSV is not one period of 1440 rows"
import csv, sys
rows = list(csv.reader(open(sys.argv[1])))
assert rows[0] == ["theta_deg", "line_current_a", "voltage_v", "dc_voltage_v"], rows[0]
data = [[float(x) for x in r] for r in rows[1:]]
assert len(data) == 1440, len(data)
steps = [b[0] - a[0] for a, b in zip(data, data[1:])]
assert all(abs(s - 0.25) < 1e-3 for s in steps), "theta grid"
assert any(abs(r[1]) > 1.0 for r in data) and all(r[3] > 0.0 for r in data), "values"
EOF
python3 -c 'import sys, xml.etree.ElementTree as E; assert E.parse(sys.argv[1]).getroot().tag.endswith("svg")' \
  "$WORK/vsd.svg" || fail "bridge: --svg output is not well-formed SVG"
grep -q 'THDi' "$WORK/vsd.svg" || fail "bridge: the chart title has no THDi"

# 2. The ready-to-paste block reproduces the group: pasted into a measured drive of the same name,
# the group's study-frame spectrum matches the bridge's (PLANT-FORMAT.md "Conventions"). Rounding
# of the block (0.01 %, 0.1 deg, 4 digits of power factor) bounds the differences.
{
  echo "overtone: 1"
  echo "extends: $PLANT"
  echo "drives:"
  echo "  - name: BENCH-VSD"
  echo "    bus: BENCH-480"
  echo "    count: 4"
  echo "    power: 75 kW"
  echo "    front_end: measured"
  sed -n '/^For a `measured` drive/,/^$/{/^    /p}' "$WORK/bridge.out"
} >"$WORK/pasted.yaml"
grep -q 'harmonics:' "$WORK/pasted.yaml" || fail "bridge: no ready-to-paste harmonics block"
run pasted 0 "$BIN" spectrum "$WORK/pasted.yaml" --drive BENCH-VSD --json "$WORK/pasted.json"
python3 - "$WORK/vsd.json" "$WORK/pasted.json" <<'EOF' || fail "pasted block does not reproduce the spectrum"
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:])
assert b["front_end"] == "measured"
assert abs(a["i1_a"] - b["i1_a"]) < 1e-3 * a["i1_a"], (a["i1_a"], b["i1_a"])
for ha, hb in zip(a["harmonics"], b["harmonics"]):
    if ha["percent"] < 1.0:
        continue
    h = ha["order"]
    assert abs(ha["percent"] - hb["percent"]) < 0.02, (h, ha["percent"], hb["percent"])
    turn = (ha["angle_deg"] - hb["angle_deg"] + 180.0) % 360.0 - 180.0
    assert abs(turn) < 0.1 + 0.02 * h, (h, ha["angle_deg"], hb["angle_deg"])
EOF

# 3. A table front end: the table works; waveform and chart are refused (exit 2, nothing written).
run table 0 "$BIN" spectrum "$PLANT" --drive BENCH-TABLE
grep -q 'no waveform' "$WORK/table.out" || fail "table: does not say that there is no waveform"
# BENCH-TABLE's 5th is 34 % at -175 deg in the plant file; the table shows it back unchanged.
grep -Eq '^ +5 +[0-9.]+ +34\.00 +-175\.0$' "$WORK/table.out" ||
  fail "table: 5th row is not 34.00 % at -175.0 deg"
run table_svg 2 "$BIN" spectrum "$PLANT" --drive BENCH-TABLE --svg "$WORK/table.svg" \
  --json "$WORK/table.json"
grep -q 'error: .*--svg' "$WORK/table_svg.err" || fail "table_svg: no clear error naming --svg"
[ ! -e "$WORK/table.svg" ] && [ ! -e "$WORK/table.json" ] || fail "table_svg: a file was written"

# 4. An unknown drive: exit 2 with a did-you-mean, nothing written.
run unknown 2 "$BIN" spectrum "$PLANT" --drive BENCH-VSDX --json "$WORK/unknown.json"
grep -q 'did you mean `BENCH-VSD`' "$WORK/unknown.err" || fail "unknown: no did-you-mean"
[ ! -e "$WORK/unknown.json" ] || fail "unknown: $WORK/unknown.json was written"

cli_finish "spectrum CLI"
