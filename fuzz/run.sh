#!/usr/bin/env bash
# Builds the libFuzzer targets (clang, with AddressSanitizer and UndefinedBehaviorSanitizer) and runs
# each for a bounded time, starting from the seed corpus in fuzz/corpus/<target>/. Fails on any crash,
# leak, timeout or sanitizer report; the input that caused it is written into the seed corpus itself,
# as fuzz/corpus/<target>/found-crash-* (or found-leak-*, found-timeout-*), so that once the bug is
# fixed the input is committed with the fix and every later run starts from it.
#   bash fuzz/run.sh                          # 60 s per target, a new random seed
#   RTLINE_FUZZ_SECONDS=600 bash fuzz/run.sh   # longer
#   RTLINE_FUZZ_SEED=12345 bash fuzz/run.sh    # replay the seed a run printed
# Each run draws a new seed (from /dev/urandom) and prints it first, so that runs keep exploring new
# inputs and a red run replays with the same seed. Inputs that only add coverage go to a scratch
# folder and are discarded (the corpus stays small and reviewed).
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${RTLINE_FUZZ_SECONDS:-60}
seed=${RTLINE_FUZZ_SEED:-$(( $(od -An -N4 -tu4 /dev/urandom) % 2147483647 + 1 ))}
echo "fuzz: seed $seed (replay with RTLINE_FUZZ_SEED=$seed bash fuzz/run.sh)"
build=build-fuzz
targets=(values rtcsv spec)
jobs=$(nproc 2>/dev/null || echo 2)

# -O1 with line tables: stack traces name the line, and the instrumented build stays quick to compile.
cmake -S . -B "$build" -DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=RelWithDebInfo \
      -DCMAKE_CXX_FLAGS_RELWITHDEBINFO="-O1 -gline-tables-only" -DRTLINE_FUZZ=ON -DRTLINE_BUILD_TESTS=OFF >&2
cmake --build "$build" -j"$jobs" --target "${targets[@]/#/fuzz_}" >&2

scratch=$(mktemp -d)
trap 'rm -rf "$scratch"' EXIT
failed=0
for t in "${targets[@]}"; do
  log="$build/fuzz-$t.log"
  mkdir -p "$scratch/$t"
  status=0
  ASAN_OPTIONS=detect_leaks=1 "$build/fuzz/fuzz_$t" -max_total_time="$seconds" -seed="$seed" -timeout=10 -rss_limit_mb=2048 \
      -print_final_stats=1 -dict="fuzz/$t.dict" -artifact_prefix="fuzz/corpus/$t/found-" \
      "$scratch/$t" "fuzz/corpus/$t" >"$log" 2>&1 || status=$?
  # A sanitizer report is a failure even if the process somehow exited 0.
  if [ "$status" -eq 0 ] && grep -q -E 'ERROR: (Address|Leak|UndefinedBehavior)Sanitizer|runtime error:|fuzz property failed' "$log"; then
    status=1
  fi
  execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1)
  used_seed=$(sed -n 's/^INFO: Seed: *//p' "$log" | head -1)  # the one libFuzzer drew when seed is 0
  if [ "$status" -eq 0 ]; then
    echo "fuzz: $t: ${execs:-?} executions in $seconds s (seed ${used_seed:-$seed}); no crash, leak or sanitizer report"
  else
    echo "fuzz: $t: FAILED (exit $status) after ${execs:-?} executions (seed ${used_seed:-$seed}); the end of $log:"
    tail -n 40 "$log"
    ls fuzz/corpus/"$t"/found-* 2>/dev/null | sed 's/^/fuzz: the input is kept in the corpus: /' || true
    failed=$((failed + 1))
  fi
done
echo "fuzz: $(( ${#targets[@]} - failed )) passed, $failed failed"
[ "$failed" -eq 0 ]
