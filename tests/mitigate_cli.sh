#!/usr/bin/env bash
# tests/mitigate_cli.sh — `overtone headroom` and `overtone mitigate` through the command line.
#
# Usage: mitigate_cli.sh OVERTONE_BINARY SOURCE_DIR
# Expected behaviour from docs/headroom.md and docs/mitigate.md: usage errors exit 2 with a clear
# message and write nothing (PLANT-FORMAT.md "Errors"); the JSON shapes of PLANT-FORMAT.md;
# every option file passes `overtone check`; a studied option file gives the option's figures;
# a plant within its limits is told so and nothing is written; every output carries the cautions.
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
DEMO=$2/cases/demo/plant.yaml
MILL=$2/tests/plants/mitigate/resonant-mill.yaml

# 1. headroom: unknown drive kind, unknown bus, no candidate buses: exit 2, nothing written.
run kind 2 "$BIN" headroom "$DEMO" --drive-kind NO-SUCH --bus MCC-B1 --json "$WORK/h.json"
grep -q "no drive group named 'NO-SUCH'" "$WORK/kind.err" || fail "kind: message: $(cat "$WORK/kind.err")"
run bus 2 "$BIN" headroom "$DEMO" --drive-kind VFD-B1 --bus NO-BUS --json "$WORK/h.json"
grep -q "no bus named 'NO-BUS'" "$WORK/bus.err" || fail "bus: message: $(cat "$WORK/bus.err")"
run nobus 2 "$BIN" headroom "$DEMO" --drive-kind VFD-B1 --json "$WORK/h.json"
run jsonfolder 2 "$BIN" headroom "$DEMO" --drive-kind VFD-B1 --bus MCC-B1 --json "$WORK/no/h.json"
grep -q "the folder does not exist" "$WORK/jsonfolder.err" || fail "jsonfolder: $(cat "$WORK/jsonfolder.err")"
[ -e "$WORK/h.json" ] && fail "headroom wrote JSON after a usage error"

# 2. headroom JSON shape (PLANT-FORMAT.md) and the cautions in the table.
run headroom 0 "$BIN" headroom "$DEMO" --drive-kind VFD-B1 --bus MCC-B1 --json "$WORK/h.json"
grep -q "screening study" "$WORK/headroom.out" || fail "headroom: no cautions in the table"
/usr/bin/python3 - "$WORK/h.json" <<'PY' || fail "headroom JSON shape"
import json, sys
d = json.load(open(sys.argv[1]))
(h,) = d["headroom"]
assert h["bus"] == "MCC-B1" and isinstance(h["added_units"], int) and h["added_units"] > 0
assert abs(h["added_kw"] - 7.5 * h["added_units"]) < 1e-9      # VFD-B1 units are 7.5 kW
b = h["binding"]
assert set(b) == {"where", "what", "value", "limit"} and b["value"] > b["limit"]
assert any("screening study" in c for c in d["cautions"])
PY

# 3. mitigate: an unreadable plant and a missing -o exit 2 and write nothing.
run badplant 2 "$BIN" mitigate "$WORK/none.yaml" -o "$WORK/bad" --json "$WORK/bad.json"
[ -e "$WORK/bad" ] || [ -e "$WORK/bad.json" ] && fail "mitigate wrote output for a missing plant"
run noout 2 "$BIN" mitigate "$MILL"
touch "$WORK/afile"
run outfile 2 "$BIN" mitigate "$MILL" -o "$WORK/afile" --json "$WORK/bad.json"
grep -q "is not a folder" "$WORK/outfile.err" || fail "outfile: $(cat "$WORK/outfile.err")"
[ -e "$WORK/bad.json" ] && fail "outfile: wrote JSON"

# 4. mitigate on the resonant mill: JSON shape, every file checks, one file reproduces.
run mitigate 0 "$BIN" mitigate "$MILL" -o "$WORK/opt" --json "$WORK/m.json"
grep -q "screening study" "$WORK/mitigate.out" || fail "mitigate: no cautions in the table"
/usr/bin/python3 - "$WORK/m.json" "$WORK/opt" <<'PY' || fail "mitigate JSON shape or files"
import json, os, sys
d = json.load(open(sys.argv[1]))
keys = {"name", "plant_file", "meets_profile", "worst_thd_v_percent", "pcc_tdd_percent",
        "capacitors_pass", "resonance_risk", "size", "score"}
assert d["options"], "no options"
for o in d["options"]:
    assert keys <= set(o), keys - set(o)
    assert os.path.isfile(os.path.join(sys.argv[2], o["plant_file"])), o["plant_file"]
assert any("screening study" in c for c in d["cautions"])
PY
for f in "$WORK"/opt/*.yaml; do
  run check 0 "$BIN" check "$f"
done
first=$(/usr/bin/python3 -c "import json,sys; print(json.load(open(sys.argv[1]))['options'][0]['plant_file'])" "$WORK/m.json")
run reproduce 0 "$BIN" study "$WORK/opt/$first" --json "$WORK/s.json"
/usr/bin/python3 - "$WORK/m.json" "$WORK/s.json" <<'PY' || fail "option $first does not reproduce"
import json, sys
o = json.load(open(sys.argv[1]))["options"][0]
s = json.load(open(sys.argv[2]))
worst = max(b["thd_v_percent"] for b in s["buses"])
assert abs(worst - o["worst_thd_v_percent"]) < 1e-6 * max(1, worst), (worst, o)
assert abs(s["pcc"]["tdd_percent"] - o["pcc_tdd_percent"]) < 1e-6 * max(1, o["pcc_tdd_percent"])
assert (not s["assessment"]["violations"]) == o["meets_profile"]
PY

# 5. A plant within its limits: said so, exit 0, no folder.
run within 0 "$BIN" mitigate "$DEMO" -o "$WORK/none"
grep -q "nothing to mitigate" "$WORK/within.out" || fail "within: $(head -n 3 "$WORK/within.out")"
[ -e "$WORK/none" ] && fail "within: wrote a folder"

# 6. `overtone report --mitigate`: the section, after Resonances, and the option files beside it;
# without the flag, no section and no folder.
run report 0 "$BIN" report "$MILL" -o "$WORK/rep" --mitigate
grep -q "^## Mitigation options" "$WORK/rep/report.md" || fail "report: no mitigation section"
grep -q "Mitigation options</h2>" "$WORK/rep/report.html" || fail "report.html: no mitigation section"
[ "$(grep -n '^## ' "$WORK/rep/report.md" | grep -A1 'Resonances' | tail -n 1 | cut -d' ' -f2-)" = \
  "Mitigation options" ] || fail "report: mitigation section not after Resonances"
ls "$WORK/rep/mitigation/"*.yaml >/dev/null 2>&1 || fail "report: no option files"
run reportcheck 0 "$BIN" check "$(ls "$WORK/rep/mitigation/"*.yaml | head -n 1)"
run plain 0 "$BIN" report "$MILL" -o "$WORK/plain"
grep -q "Mitigation options" "$WORK/plain/report.md" && fail "report without --mitigate has the section"
[ -e "$WORK/plain/mitigation" ] && fail "report without --mitigate wrote option files"

cli_finish "mitigate CLI"
