#!/usr/bin/env bash
# tests/report_cli.sh — `overtone report PLANT -o DIR` on the demo plant: every section in
# report.md and report.html, the cautions, the CSV tables, and inline SVG that parses as XML.
# Section list from issue 6 ("overtone report"); cautions from the study's StandardCautions.
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
for section in "Summary" "Inputs" "Bus voltage distortion" "Current at the point of common coupling" \
               "Violations" "Drive groups, capacitor duty, transformers, resonances" "Method and references"; do
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
python3 - "$WORK/out" <<'PY' || fail "SVG does not parse as XML"
import re, sys, xml.etree.ElementTree as ET
d = sys.argv[1]
html = open(d + "/report.html", encoding="utf-8").read()
svgs = re.findall(r"<svg.*?</svg>", html, re.S)
assert len(svgs) == 2, len(svgs)
for s in svgs:
    ET.fromstring(s)
for f in ("thdv.svg", "pcc_current.svg"):
    ET.parse(d + "/" + f)
PY
# A bad plant: exit 2 and no report directory.
"$BIN" report "$SRC/tests/plants/bad/limits-broken.yaml" -o "$WORK/bad" >/dev/null 2>&1
status=$?
[ "$status" -eq 2 ] || fail "bad plant: exit status $status, expected 2"
[ ! -e "$WORK/bad" ] || fail "bad plant: output written"

if [ "$failures" -ne 0 ]; then
  echo "$failures check(s) failed" >&2
  exit 1
fi
echo "report CLI: all checks passed"
