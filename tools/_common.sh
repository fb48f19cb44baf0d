# tools/_common.sh — shared by tools/demo, tools/test and tools/bench: install what is missing, build.
set -euo pipefail
ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
BUILD=${OVERTONE_BUILD_DIR:-$ROOT/build}
PACKAGES=(cmake g++ make libeigen3-dev libsuitesparse-dev libyaml-dev libspdlog-dev catch2
          libcli11-dev nlohmann-json3-dev libfmt-dev ngspice python3 python3-numpy python3-yaml)

install_missing() {
  local missing=()
  for p in "${PACKAGES[@]}" "$@"; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
  done
  [ ${#missing[@]} -eq 0 ] && return 0
  echo "installing: ${missing[*]}"
  local sudo=""
  [ "$(id -u)" -ne 0 ] && sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq "${missing[@]}"
}

# configure [CMAKE ARGS...]: Release unless the arguments say otherwise.
configure() {
  cmake -S "$ROOT" -B "$BUILD" -DCMAKE_BUILD_TYPE=Release "$@" >/dev/null
}

# build [CMAKE ARGS...]: configure, then build every target.
build() {
  configure "$@"
  cmake --build "$BUILD" -j "$(nproc)"
}
