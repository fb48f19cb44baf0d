#!/usr/bin/env bash
# tests/cli_bad_input.sh — bad plant files through the CLI: exit 2, located errors, nothing written.
#
# Usage: cli_bad_input.sh OVERTONE_BINARY SOURCE_DIR
# For three files of tests/bad, runs `overtone check FILE` and `overtone study FILE --json OUT`
# and checks the contract of PLANT-FORMAT.md "Errors": exit status 2, `file:line:col: error:` on
# stderr (at the place the file's `# expect:` line names), and OUT not created; then two
# generated adversarial files.
set -u
source "$(dirname "$0")/cli_lib.sh"
cli_start "OVERTONE_BINARY SOURCE_DIR" "$@"
BIN=$1
SRC=$2

# expect_input_error NAME PLACE OUT COMMAND...: COMMAND must exit 2, print PLACE: error: on
# stderr, and leave OUT (if not empty) uncreated.
expect_input_error() {
  local name=$1 place=$2 out=$3
  shift 3
  local status=0
  "$@" >"$WORK/stdout" 2>"$WORK/stderr" || status=$?
  [ "$status" -eq 2 ] || fail "$name: exit status $status, expected 2"
  grep -Eq '^.+:[0-9]+:[0-9]+: error: ' "$WORK/stderr" ||
    fail "$name: no 'file:line:col: error:' on stderr"
  grep -Eq "^$(printf '%s' "$place" | sed 's/[.[\*^$/]/\\&/g')(:[0-9]+:[0-9]+)?: error: " \
    "$WORK/stderr" || fail "$name: no error at $place on stderr"
  if [ -n "$out" ] && [ -e "$out" ]; then fail "$name: $out was written"; fi
}

for case in syntax_error wrong_unit unknown_bus; do
  file="$SRC/tests/bad/$case.yaml"
  line_col=$(sed -n '1s/^# expect: \([0-9]*:[0-9]*\) .*/\1/p' "$file")
  [ -n "$line_col" ] || fail "$case: no '# expect: LINE:COL' line"
  expect_input_error "check $case" "$file:$line_col" "" "$BIN" check "$file"
  expect_input_error "study $case" "$file:$line_col" "$WORK/$case.json" \
    "$BIN" study "$file" --json "$WORK/$case.json"
done

# Generated here, too big to keep: 10,000 nested `[` (refused at the 65th, column 72 of line 2)
# and 50 MB of random bytes from a fixed seed (refused at the first byte that is not UTF-8).
python3 -c "import sys; sys.stdout.write('overtone: 1\nbuses: ' + '[' * 10000)" >"$WORK/deep.yaml"
expect_input_error "study deep nesting" "$WORK/deep.yaml:2:71" "$WORK/deep.json" \
  "$BIN" study "$WORK/deep.yaml" --json "$WORK/deep.json"
python3 -c "import random, sys; random.seed(8); sys.stdout.buffer.write(random.randbytes(50 << 20))" \
  >"$WORK/random.yaml"
expect_input_error "study random bytes" "$WORK/random.yaml" "$WORK/random.json" \
  "$BIN" study "$WORK/random.yaml" --json "$WORK/random.json"

cli_finish "CLI bad-input"
