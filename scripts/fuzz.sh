#!/usr/bin/env bash
# Builds the fuzz targets with clang (libFuzzer + AddressSanitizer +
# UndefinedBehaviorSanitizer) and runs each for the given seconds (default
# 60) from the seed corpus. A crash fails the run and leaves its input as
# build-fuzz/crash-*; copy it to tests/fuzz/regressions/<corpus>-<name> so
# that every build replays it. Timeouts (a call that runs for ever) and
# memory blow-ups count as failures too. The bindings target
# (tests/fuzz/fuzz_bindings.py, random arguments through the Python binding)
# runs as long against a plain build of the library and the binding under
# /usr/bin/python3; a finding prints its seed and call. Long run:
# scripts/fuzz.sh 3600
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${1:-60}
shopt -s nullglob
# a failing input of an earlier run is either a regression test by now or
# still to be looked at: never run over it
left=(build-fuzz/crash-* build-fuzz/leak-* build-fuzz/timeout-* build-fuzz/oom-*)
if ((${#left[@]} > 0)); then
  echo "fuzz: failing inputs of an earlier run remain: ${left[*]}" >&2
  echo "fuzz: copy each to tests/fuzz/regressions/ (once fixed), then delete it" >&2
  exit 1
fi
CC=clang cmake -S . -B build-fuzz -DKINLOOP_FUZZ=ON -DKINLOOP_SANITIZE=ON \
  -DKINLOOP_BUILD_BINDINGS=OFF -DKINLOOP_BUILD_EXAMPLES=OFF \
  -DCMAKE_BUILD_TYPE=RelWithDebInfo >/dev/null
cmake --build build-fuzz -j2 --target fuzz_model_read fuzz_study_read \
  fuzz_study_run fuzz_api
for pair in model_read:model study_read:study study_run:study_run api:api; do
  target=${pair%%:*}
  corpus=${pair##*:}
  work=build-fuzz/corpus-$corpus
  mkdir -p "$work"
  cp -n tests/fuzz/corpus/"$corpus"/* "$work"/ 2>/dev/null || true
  echo "== fuzz_$target for $seconds s =="
  (cd build-fuzz && ASAN_OPTIONS=detect_leaks=1 \
     ./tests/fuzz/fuzz_"$target" -max_total_time="$seconds" -timeout=10 \
     -rss_limit_mb=2048 -print_final_stats=1 "corpus-$corpus" 2>&1 |
     grep -E "^(#[0-9]+.*DONE|Done|stat::number_of_executed_units|==.*ERROR|SUMMARY)" || true)
  found=(build-fuzz/crash-* build-fuzz/leak-* build-fuzz/timeout-* build-fuzz/oom-*)
  if ((${#found[@]} > 0)); then
    echo "fuzz: fuzz_$target found failing inputs: ${found[*]}" >&2
    exit 1
  fi
done
echo "== fuzz_bindings for $seconds s =="
# the bindings are configured with the tests (their targets live there)
cmake -S . -B build-fuzz-bindings -DKINLOOP_BUILD_EXAMPLES=OFF \
  -DCMAKE_BUILD_TYPE=RelWithDebInfo >/dev/null
cmake --build build-fuzz-bindings -j2 --target kinloop kinloop_python
PYTHONPATH=build-fuzz-bindings/bindings/python PYTHONDONTWRITEBYTECODE=1 \
  /usr/bin/python3 tests/fuzz/fuzz_bindings.py --seconds "$seconds"
echo "fuzz: no failures in $seconds s per target"
