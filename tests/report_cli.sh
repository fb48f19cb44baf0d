#!/usr/bin/env bash
# tests/report_cli.sh — `overtone report PLANT -o DIR` on the demo plant: every section in
# report.md and report.html, the cautions, the CSV tables, every chart (inline and as a file)
# parses as XML, and `--against BASE` adds the comparison. Section list from issue 6
# ("overtone report"); cautions from the study's StandardCautions.
#
# Usage: report_cli.sh OVERTONE_BINARY SOURCE_DIR
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
SRC=$2

"$BIN" report "$SRC/cases/demo/plant.yaml" -o "$WORK/out" >"$WORK/run.out" 2>"$WORK/run.err" ||
  fail "report: exit status $? ($(head -c 300 "$WORK/run.err"))"
for f in report.md report.html thdv.svg pcc_current.svg buses.csv bus_harmonics.csv drives.csv branches.csv; do
  [ -s "$WORK/out/$f" ] || fail "no $f"
done
SECTIONS=("Summary" "Bus voltage distortion" "Current at the point of common coupling" "Violations"
          "Summation rules compared" "Inputs" "Drive groups" "Capacitor duty and transformer derating"
          "Resonances" "Method and references")
for section in "${SECTIONS[@]}"; do
  grep -q "^## $section\$" "$WORK/out/report.md" || fail "report.md: no section '$section'"
  grep -q "<h2>$section</h2>" "$WORK/out/report.html" || fail "report.html: no section '$section'"
done
for words in "screening study" "input data" "measurement" "licensed professional engineer"; do
  grep -q "$words" "$WORK/out/report.md" || fail "report.md: caution '$words' missing"
  grep -q "$words" "$WORK/out/report.html" || fail "report.html: caution '$words' missing"
done
if grep -o 'https\?://[^" ]*' "$WORK/out/report.html" | grep -v '^http://www.w3.org/2000/svg$' | grep -q .; then
  fail "report.html refers to the network"
fi
# Every chart: inline in the HTML (one per SVG file, same count) and as a file, parses as XML;
# one chart per drive group and per scanned bus (the pcc and the two capacitor buses); the scan
# charts mark the characteristic orders.
check_charts() {
  /usr/bin/python3 - "$1" <<'PY'
import glob, os, re, sys, xml.etree.ElementTree as ET
d = sys.argv[1]
html = open(d + "/report.html", encoding="utf-8").read()
svgs = re.findall(r"<svg.*?</svg>", html, re.S)
files = sorted(glob.glob(d + "/*.svg"))
assert len(svgs) == len(files), (len(svgs), len(files))
for s in svgs:
    ET.fromstring(s)
for f in files:
    ET.parse(f)
names = {os.path.basename(f) for f in files}
assert {"thdv.svg", "pcc_current.svg", "scan_MSG-13.svg", "scan_USS-B.svg", "scan_USS-D.svg"} <= names, names
drives = [n for n in names if n.startswith("drive_")]
assert len(drives) >= 11, drives  # the demo plant's eleven drive groups
assert "Characteristic orders" in open(d + "/scan_MSG-13.svg").read()
ids = re.findall(r'<pattern id="([^"]+)"', html)
assert len(ids) == len(set(ids)), "duplicate pattern ids in one page"
PY
}
check_charts "$WORK/out" || fail "charts"

# --against: the proposed demo case against the base; the comparison section and its tables.
"$BIN" report "$SRC/cases/demo/proposed.yaml" --against "$SRC/cases/demo/plant.yaml" -o "$WORK/against" \
  >"$WORK/against.out" 2>"$WORK/against.err" || fail "report --against: exit status $?"
for section in "${SECTIONS[@]}" "Comparison with the base case"; do
  grep -q "^## $section\$" "$WORK/against/report.md" || fail "--against report.md: no section '$section'"
  grep -q "<h2>$section</h2>" "$WORK/against/report.html" || fail "--against report.html: no section '$section'"
done
grep -q '^\*\*New violations\*\*$' "$WORK/against/report.md" || fail "--against: no new violations table"
grep -q '^| USS-E | - | .* | added |$' "$WORK/against/report.md" || fail "--against: USS-E not added"
grep -q "Comparison with the base case" "$WORK/out/report.md" && fail "report without --against has a comparison"
check_charts "$WORK/against" || fail "--against charts"

# A bad plant: exit 2 and no report directory.
"$BIN" report "$SRC/tests/plants/bad/limits-broken.yaml" -o "$WORK/bad" >/dev/null 2>&1
status=$?
[ "$status" -eq 2 ] || fail "bad plant: exit status $status, expected 2"
[ ! -e "$WORK/bad" ] || fail "bad plant: output written"
"$BIN" report "$SRC/cases/demo/plant.yaml" --against "$SRC/tests/plants/bad/limits-broken.yaml" -o "$WORK/bad2" >/dev/null 2>&1
status=$?
[ "$status" -eq 2 ] || fail "bad base plant: exit status $status, expected 2"
[ ! -e "$WORK/bad2" ] || fail "bad base plant: output written"

cli_finish "report CLI"
