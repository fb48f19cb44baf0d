# tests/cli_lib.sh — shared by the CLI test scripts: argument check, a scratch folder, failures.
#
# cli_start "ARG1 ARG2" "$@": exits 2 with a usage line unless exactly two arguments are given;
# then WORK is a scratch folder removed on exit, and `fail MESSAGE` records a failure that the
# script reports through $failures.
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
