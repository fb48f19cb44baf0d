# tests/cli_lib.sh — shared by the CLI test scripts: argument check, a scratch folder, failures.
#
# cli_start "ARG1 ARG2" "$@": exits 2 with a usage line unless exactly two arguments are given;
# then WORK is a scratch folder removed on exit, `fail MESSAGE` records a failure, and
# `cli_finish WHAT` ends the script: status 1 when any check failed.
cli_start() {
  local usage=$1
  shift
  if [ $# -ne 2 ]; then
    echo "usage: $(basename "$0") $usage" >&2
    exit 2
  fi
  WORK=$(mktemp -d)
  trap 'rm -rf "$WORK"' EXIT
  failures=0
}

fail() {
  echo "FAIL: $*" >&2
  failures=$((failures + 1))
}

# run NAME EXPECTED_STATUS COMMAND...: stdout and stderr into $WORK/NAME.out and .err; a
# different exit status is a failure.
run() {
  local name=$1 expected=$2 status=0
  shift 2
  "$@" >"$WORK/$name.out" 2>"$WORK/$name.err" || status=$?
  [ "$status" -eq "$expected" ] ||
    fail "$name: exit status $status, expected $expected ($(head -c 400 "$WORK/$name.err"))"
}

# cli_finish WHAT: the script's verdict on its checks of WHAT, and its exit status.
cli_finish() {
  if [ "$failures" -ne 0 ]; then
    echo "$failures $1 check(s) failed" >&2
    exit 1
  fi
  echo "$1: all checks passed"
}

# check_terminal_colour NAME WORD COMMAND...: on a terminal (script(1) gives the run one) the
# command colours its output; with --no-color it does not, and WORD still marks the result.
check_terminal_colour() {
  local name=$1 word=$2
  shift 2
  local command
  printf -v command "'%s' " "$@"
  script -qec "$command" /dev/null >"$WORK/$name-tty.out" 2>&1
  grep -q $'\x1b\\[' "$WORK/$name-tty.out" || fail "$name: no colour on a terminal"
  script -qec "$command --no-color" /dev/null >"$WORK/$name-nocolor.out" 2>&1
  if grep -q $'\x1b\\[' "$WORK/$name-nocolor.out"; then fail "$name: colour with --no-color"; fi
  grep -q "$word" "$WORK/$name-nocolor.out" || fail "$name: '$word' not written in words"
}
