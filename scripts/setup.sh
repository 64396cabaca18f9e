#!/usr/bin/env bash
# One-step set-up for a fresh Debian 12 machine: installs the Debian packages rtline needs (apt-get,
# through sudo when not root), configures and builds, then either runs the bundled example or the
# whole test suite.
#   bash scripts/setup.sh demo                  # build, then size the greenhouse example
#   bash scripts/setup.sh test                  # build and run every test through ctest; install into a
#                                               # temporary prefix and build tests/consumer against it;
#                                               # build, install and remove the Debian package; then the
#                                               # same suite under ASan/UBSan (build-asan/), then the fuzzers
#   RTLINE_QUICK=1 bash scripts/setup.sh test   # the first ctest run and the two package stages only
# The test mode ends with one summary line: "setup: N passed, N failed".
set -euo pipefail
mode=${1:-demo}
cd "$(dirname "$0")/.."

packages=(g++ cmake make libeigen3-dev libcli11-dev nlohmann-json3-dev doctest-dev
          ngspice python3 python3-numpy python3-scipy jq clang libclang-rt-14-dev
          help2man man-db dpkg-dev file)  # man pages at build time; the Debian package and its checks
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

passed=0
failed=0
# Runs ctest in build folder $1, labelled $2, and adds its counts to the totals. ctest's own summary
# ("100% tests passed, 0 tests failed out of N") stays in the output.
run_ctest() {
  local log status=0 total bad
  log=$(mktemp)
  (cd "$1" && ctest --output-on-failure -j"$jobs") 2>&1 | tee "$log" || status=$?
  total=$(sed -n 's/.* tests failed out of \([0-9]*\).*/\1/p' "$log" | tail -1)
  bad=$(sed -n 's/.* \([0-9]*\) tests failed out of .*/\1/p' "$log" | tail -1)
  rm -f "$log"
  if [ -z "$total" ]; then total=1; bad=1; fi  # ctest did not get as far as its summary
  passed=$((passed + total - bad))
  failed=$((failed + bad))
  summary+=("setup: $2: $((total - bad)) passed, $bad failed")
  [ "$status" -eq 0 ] && [ "$bad" -eq 0 ]
}

# Runs the function $1 as one stage labelled $2: 1 passed or 1 failed in the totals.
run_stage() {
  local status
  # Not as `"$1" || …`: bash ignores the stage's own `set -e` in that position.
  set +e
  "$1"
  status=$?
  set -e
  if [ "$status" -eq 0 ]; then
    passed=$((passed + 1))
    summary+=("setup: $2: 1 passed, 0 failed")
  else
    failed=$((failed + 1))
    summary+=("setup: $2: 0 passed, 1 failed")
  fi
  [ "$status" -eq 0 ]
}

# cmake --install of build/ into a temporary prefix; tests/consumer configured against it with
# find_package(rtline), built and run (it checks the library's figures against the beta equation).
consumer_stage() (
  set -e
  prefix=$(mktemp -d)
  trap 'rm -rf "$prefix"' EXIT
  cmake --install build --prefix "$prefix/usr" >&2
  for f in bin/rtline lib/cmake/rtline/rtlineConfig.cmake share/man/man1/rtline-check.1.gz \
           share/bash-completion/completions/rtline include/rtline/thermistor.hpp; do
    [ -e "$prefix/usr/$f" ] || { echo "setup: the install lacks $f" >&2; exit 1; }
  done
  cmake -S tests/consumer -B "$prefix/consumer" -DCMAKE_PREFIX_PATH="$prefix/usr" >&2
  cmake --build "$prefix/consumer" >&2
  "$prefix/consumer/consumer"
)

# The Debian package from build/ (cpack -G DEB), installed with apt, checked, then removed again.
# An rtline package that is already installed is left alone (and the stage fails).
deb_stage() (
  set -e
  sudo=""
  [ "$(id -u)" -ne 0 ] && sudo=sudo
  if dpkg-query -W -f='${Status}' rtline 2>/dev/null | grep -q "install ok installed"; then
    echo "setup: an rtline package is installed already; remove it to let this stage test the new one" >&2
    exit 1
  fi
  rm -f build/rtline_*.deb
  (cd build && cpack -G DEB >&2)
  deb=$(ls build/rtline_*.deb)
  echo "setup: built $deb ($(du -k "$deb" | cut -f1) kB)"
  trap '$sudo apt-get remove -y -qq rtline >&2 || true' EXIT
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq "./$deb" >&2
  [ "$(/usr/bin/rtline --version)" = "$(build/rtline --version)" ]
  /usr/bin/rtline --version
  man rtline-check | grep -q -- '--r25'
  echo "setup: man rtline-check shows $(man rtline-check 2>/dev/null | wc -l) lines"
  bash -c 'source /usr/share/bash-completion/completions/rtline && complete -p rtline' >/dev/null
  $sudo apt-get remove -y -qq rtline >&2
  trap - EXIT
  if [ -e /usr/bin/rtline ]; then echo "setup: /usr/bin/rtline is still there after removal" >&2; exit 1; fi
  echo "setup: the package installed, ran and was removed cleanly"
)

finish() {
  printf '%s\n' "${summary[@]}"
  echo "setup: $passed passed, $failed failed"
  [ "$failed" -eq 0 ]
}

summary=()
case "$mode" in
  demo)
    bash examples/greenhouse-vent.sh build/rtline
    ;;
  test)
    run_ctest build "test suite (build/)" || { finish; exit 1; }
    run_stage consumer_stage "install and consumer (tests/consumer/)" || { finish; exit 1; }
    run_stage deb_stage "Debian package (apt install ./build/rtline_*.deb)" || { finish; exit 1; }
    if [ "${RTLINE_QUICK:-0}" != 1 ]; then
      # The same suite with every target built by clang under AddressSanitizer and UBSan.
      cmake -S . -B build-asan -DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=RelWithDebInfo \
            -DCMAKE_CXX_FLAGS_RELWITHDEBINFO="-O1 -gline-tables-only" -DRTLINE_SANITIZE=ON >&2
      cmake --build build-asan -j"$jobs" >&2
      export ASAN_OPTIONS=detect_leaks=1 UBSAN_OPTIONS=print_stacktrace=1
      run_ctest build-asan "ASan/UBSan suite (build-asan/)" || { finish; exit 1; }
      fuzz_log=$(mktemp)
      fuzz_status=0
      bash fuzz/run.sh 2>&1 | tee "$fuzz_log" || fuzz_status=$?
      fuzz_passed=$(sed -n 's/^fuzz: \([0-9]*\) passed, \([0-9]*\) failed$/\1/p' "$fuzz_log")
      fuzz_failed=$(sed -n 's/^fuzz: \([0-9]*\) passed, \([0-9]*\) failed$/\2/p' "$fuzz_log")
      rm -f "$fuzz_log"
      if [ -z "$fuzz_passed" ]; then fuzz_passed=0; fuzz_failed=1; fi  # the build failed
      [ "$fuzz_status" -ne 0 ] && [ "$fuzz_failed" -eq 0 ] && fuzz_failed=1
      passed=$((passed + fuzz_passed))
      failed=$((failed + fuzz_failed))
      summary+=("setup: fuzzers (build-fuzz/): $fuzz_passed passed, $fuzz_failed failed")
    fi
    finish
    ;;
  *)
    echo "setup: unknown mode '$mode' (use demo or test)" >&2
    exit 2
    ;;
esac
