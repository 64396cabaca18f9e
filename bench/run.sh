#!/bin/sh
# Whole-process benchmarks (see bench/bench.py and docs/performance.md): builds rtline in Release (at most -j2: the
# machine is shared) and prints the median times, the numpy yardstick and their ratio.
# Usage: bench/run.sh [BUILD_DIR] [bench.py options, e.g. --runs 21 --only 1]
# Not a test: never run by ctest.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
build=${1:-"$here/../build"}
[ $# -gt 0 ] && shift
cmake -S "$here/.." -B "$build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$build" -j2 --target rtline >/dev/null
exec /usr/bin/python3 "$here/bench.py" "$build/rtline" "$@"
