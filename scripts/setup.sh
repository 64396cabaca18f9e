#!/usr/bin/env bash
# One-step set-up for a fresh Debian 12 machine: installs the Debian packages rtline needs (apt-get,
# through sudo when not root), configures and builds, then either runs the bundled example or the
# whole test suite.
#   bash scripts/setup.sh demo   # build, then size the greenhouse example
#   bash scripts/setup.sh test   # build, then run every test through ctest
set -euo pipefail
mode=${1:-demo}
cd "$(dirname "$0")/.."

packages=(g++ cmake make libeigen3-dev libcli11-dev nlohmann-json3-dev doctest-dev
          ngspice python3 python3-numpy python3-scipy jq)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing ${missing[*]}" >&2
  sudo=""
  [ "$(id -u)" -ne 0 ] && sudo=sudo
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
fi

jobs=$(nproc 2>/dev/null || echo 2)
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >&2
cmake --build build -j"$jobs" >&2

case "$mode" in
  demo)
    bash examples/greenhouse-vent.sh build/rtline
    ;;
  test)
    cd build && ctest --output-on-failure -j"$jobs"
    ;;
  *)
    echo "setup: unknown mode '$mode' (use demo or test)" >&2
    exit 2
    ;;
esac
