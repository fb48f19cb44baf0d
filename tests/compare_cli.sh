#!/usr/bin/env bash
# tests/compare_cli.sh — `overtone compare BASE PROPOSED` on case pairs whose change is known by
# hand: a one-bus plant that gains a known harmonic current source, and a capacitor bank whose
# resonance moves; then the demo pair (table, JSON shape, colour, added/removed buses) and bad
# input (exit 2, nothing written).
#
# Usage: compare_cli.sh OVERTONE_BINARY SOURCE_DIR
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
SRC=$2
PAIR=$SRC/tests/plants/compare

# 1. One 13.8 kV bus behind a 100 MVA, X/R 10 supply with a 1 % background 7th; the proposed case
#    adds a 4 MW unity-power-factor load drawing a 20 % 5th. Expected values worked independently:
#    - base: no load current, so the bus voltage is the supply EMF and THDv is the background, 1 %;
#    - proposed: the two-bus load flow V = E - Z_sc * conj(P / (3 V)) solved by fixed-point
#      iteration (constant-power load; PLANT-FORMAT.md "supplies": |Z_sc| = V_nom^2 / S_sc split by
#      X/R, R constant with order); then V_5 = |R + j5X| * I_5 (the harmonic current times the
#      system impedance at that order: Dugan et al., Electrical Power Systems Quality, ch. 5, from
#      memory) and V_7 = the 1 % background (no 7th current flows);
#    - THD and TDD as defined in IEEE Std 519-2014 clause 3 (TDD over I_L = 250 A);
#    - limits from IEEE Std 519-2014 Table 1 (1 kV < V <= 69 kV: 3.0 % individual, 5.0 % THD) and
#      Table 2 (I_sc/I_L < 20: 4.0 % below the 11th, TDD 5.0 %); from memory of the tables.
run onebus 0 "$BIN" compare "$PAIR/one-bus-base.yaml" "$PAIR/one-bus-drive.yaml" --json "$WORK/onebus.json"
run onebus_back 0 "$BIN" compare "$PAIR/one-bus-drive.yaml" "$PAIR/one-bus-base.yaml" --json -
/usr/bin/python3 - "$WORK/onebus.json" "$WORK/onebus_back.out" <<'PY' || fail "one-bus: JSON against the hand calculation"
import cmath, json, math, sys
doc = json.load(open(sys.argv[1]))
back = json.load(open(sys.argv[2]))

v_nom, s_sc, x_r, p, i_l = 13.8e3, 100e6, 10.0, 4e6, 250.0
e = v_nom / math.sqrt(3)
z_abs = v_nom ** 2 / s_sc
r = z_abs / math.sqrt(1 + x_r ** 2)
x = r * x_r
v = complex(e, 0)
for _ in range(200):
    i = (p / 3 / v).conjugate()
    v = e - complex(r, x) * i
i1 = abs(i)
v5 = abs(complex(r, 5 * x)) * 0.2 * i1
v7 = 0.01 * e
thd = 100 * math.hypot(v5, v7) / abs(v)
tdd = 100 * 0.2 * i1 / i_l
i_sc = e / z_abs
assert i_sc / i_l < 20, i_sc / i_l  # the Table 2 row used below

def close(a, b, tol):
    return abs(a - b) <= tol * max(1.0, abs(b))

bus = doc["buses"][0]
assert bus["name"] == "BUS-1" and bus["status"] == "both", bus
assert close(bus["thd_v_percent_base"], 1.0, 1e-9), bus
assert close(bus["thd_v_percent_proposed"], thd, 1e-6), (bus, thd)
assert close(bus["thd_v_change_percent"], thd - 1.0, 1e-6), bus
assert bus["worst_order_base"] == 7 and bus["worst_order_proposed"] == 5, bus
assert close(bus["worst_percent_proposed"], 100 * v5 / abs(v), 1e-6), bus
pcc = doc["pcc"]
assert pcc["bus_base"] == "BUS-1" and close(pcc["tdd_percent_base"], 0.0, 1e-9), pcc
assert close(pcc["tdd_percent_proposed"], tdd, 1e-6), (pcc, tdd)
assert pcc["worst_order_proposed"] == 5 and "worst_order_base" not in pcc, pcc

expected = set()
if 100 * v5 / abs(v) > 3.0: expected.add("v_h5")
if thd > 5.0: expected.add("thd_v")
if tdd > 5.0: expected.add("tdd")
if tdd > 4.0: expected.add("i_h5")
assert expected == {"v_h5", "tdd", "i_h5"}, expected  # the case was sized to break these three
assert {v["what"] for v in doc["new_violations"]} == expected, doc["new_violations"]
assert all(v["where"] == "BUS-1" for v in doc["new_violations"])
assert doc["cleared_violations"] == [] and doc["remaining_violations"] == [], doc
# The same pair the other way round: the violations clear.
assert {v["what"] for v in back["cleared_violations"]} == expected, back["cleared_violations"]
assert back["new_violations"] == [], back["new_violations"]
assert close(back["buses"][0]["thd_v_change_percent"], 1.0 - thd, 1e-6), back["buses"][0]
for d in (doc, back):
    assert len(d["cautions"]) == 4 and "screening study" in d["cautions"][0], d["cautions"]
PY
grep -q '^BUS-1 .* now FAIL$' "$WORK/onebus.out" || fail "one-bus: bus row not marked 'now FAIL' in words"
grep -q 'v_h5 .* new$' "$WORK/onebus.out" || fail "one-bus: new violation not marked 'new'"

# 2. A capacitor bank on the same bus, 4 Mvar then 3 Mvar: parallel resonance at
#    h = sqrt(S_sc / Q_c) (the classic estimate, IEEE Std 519-2014 clause 8 / Dugan et al. ch. 5,
#    from memory; exact here for a lossless bank and X/R 50), 5.00 then 5.77: one peak "moved".
run cap 0 "$BIN" compare "$PAIR/one-bus-cap4.yaml" "$PAIR/one-bus-cap3.yaml" --json -
/usr/bin/python3 - "$WORK/cap.out" <<'PY' || fail "capacitor: resonance shift against sqrt(S_sc/Q_c)"
import json, math, sys
doc = json.load(open(sys.argv[1]))
shifts = doc["resonance_shifts"]
assert len(shifts) == 1, shifts
s = shifts[0]
assert s["bus"] == "BUS-1" and s["change"] == "moved", s
assert abs(s["base"]["order"] - math.sqrt(100 / 4)) < 0.02, s
assert abs(s["proposed"]["order"] - math.sqrt(100 / 3)) < 0.02, s
assert s["characteristic_order"] == 5 and s["near_characteristic"] is False, s  # 5.77: 0.77 from 5
PY
#    Adding the 4 Mvar bank to the plain bus: a peak appears at 5.00, on the 5th (within 0.5).
run cap_new 0 "$BIN" compare "$PAIR/one-bus-base.yaml" "$PAIR/one-bus-cap4.yaml" --json -
/usr/bin/python3 - "$WORK/cap_new.out" <<'PY' || fail "capacitor added: resonance not 'appeared' at sqrt(S_sc/Q_c)"
import json, math, sys
s = json.load(open(sys.argv[1]))["resonance_shifts"]
assert len(s) == 1 and s[0]["change"] == "appeared" and "base" not in s[0], s
assert abs(s[0]["proposed"]["order"] - math.sqrt(100 / 4)) < 0.02, s
assert s[0]["characteristic_order"] == 5 and s[0]["near_characteristic"] is True, s
PY

# 3. The demo pair: the bottling line adds substation E (two buses) and breaks the pcc current
#    limits; the table marks changes in words and has no colour when not on a terminal.
run demo 0 "$BIN" compare "$SRC/cases/demo/plant.yaml" "$SRC/cases/demo/proposed.yaml" --json "$WORK/demo.json"
grep -q '^MCC-E1 .* added$' "$WORK/demo.out" || fail "demo: MCC-E1 not listed as added"
grep -q '^New violations: [1-9]' "$WORK/demo.out" || fail "demo: no new violation"
grep -q 'licensed professional engineer' "$WORK/demo.out" || fail "demo: cautions missing"
if grep -q $'\x1b' "$WORK/demo.out"; then fail "demo: colour codes written to a pipe"; fi
/usr/bin/python3 - "$WORK/demo.json" <<'PY' || fail "demo: JSON shape"
import json, sys
doc = json.load(open(sys.argv[1]))
for key in ("buses", "pcc", "new_violations", "cleared_violations", "remaining_violations",
            "resonance_shifts", "cautions"):
    assert key in doc, key
names = {b["name"]: b for b in doc["buses"]}
assert names["USS-E"]["status"] == "added" and "thd_v_percent_base" not in names["USS-E"], names["USS-E"]
assert names["MSG-13"]["status"] == "both", names["MSG-13"]
assert {"thd_v_percent_base", "thd_v_percent_proposed"} <= set(names["MSG-13"]), names["MSG-13"]
assert any(v["where"] == "MSG-13" for v in doc["new_violations"]), doc["new_violations"]
PY
run demo_back 0 "$BIN" compare "$SRC/cases/demo/proposed.yaml" "$SRC/cases/demo/plant.yaml"
grep -q '^USS-E .* removed$' "$WORK/demo_back.out" || fail "demo reversed: USS-E not listed as removed"

# A case against itself changes nothing (the study is deterministic, docs/output.md): every delta
# is zero, no violation is new or cleared, no peak moved.
run self 0 "$BIN" compare "$SRC/cases/demo/proposed.yaml" "$SRC/cases/demo/proposed.yaml" --json -
/usr/bin/python3 - "$WORK/self.out" <<'PY' || fail "self comparison: changes reported"
import json, sys
doc = json.load(open(sys.argv[1]))
assert all(b["status"] == "both" and b["thd_v_change_percent"] == 0 for b in doc["buses"]), doc["buses"]
assert doc["pcc"]["tdd_change_percent"] == 0, doc["pcc"]
assert doc["new_violations"] == [] and doc["cleared_violations"] == [] and doc["resonance_shifts"] == [], doc
assert len(doc["remaining_violations"]) >= 1, doc  # the proposed demo case has violations
PY

# 4. Colour only on a terminal, and never with --no-color.
check_terminal_colour compare 'now FAIL' "$BIN" compare "$PAIR/one-bus-base.yaml" "$PAIR/one-bus-drive.yaml"

# 5. A bad proposed file: exit 2 with file:line:col, and no JSON written.
run bad 2 "$BIN" compare "$PAIR/one-bus-base.yaml" "$SRC/tests/plants/bad/limits-broken.yaml" --json "$WORK/bad.json"
grep -q ':[0-9]*:[0-9]*: error:' "$WORK/bad.err" || fail "bad: no located error"
[ ! -e "$WORK/bad.json" ] || fail "bad: JSON written"

cli_finish "compare CLI"
