#!/usr/bin/env bash
# Runs every test three ways: a warnings-as-errors build with each suite
# plain and under valgrind memcheck, then an AddressSanitizer +
# UndefinedBehaviorSanitizer build; the threads and study tests under
# ThreadSanitizer;
# and a short run of each fuzz target.
set -euo pipefail
cd "$(dirname "$0")/.."
jobs=${KINLOOP_JOBS:-2}

echo "== plain build, every suite plain and under valgrind =="
cmake -S . -B build-test -DKINLOOP_WERROR=ON -DKINLOOP_MEMCHECK=ON >/dev/null
cmake --build build-test -j"$jobs"
ctest --test-dir build-test --output-on-failure -j"$jobs"

echo "== API reference (Doxygen; an undocumented public item fails) =="
cmake --build build-test --target docs

echo "== AddressSanitizer + UndefinedBehaviorSanitizer build (float-cast-overflow and float-divide-by-zero included: see KINLOOP_SANITIZE) =="
cmake -S . -B build-asan -DKINLOOP_WERROR=ON -DKINLOOP_SANITIZE=ON \
  -DCMAKE_BUILD_TYPE=Debug >/dev/null
cmake --build build-asan -j"$jobs"
# the install check builds an outside consumer without the sanitizer
# runtime, and the interpreters of the bindings are not instrumented
ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 \
  ctest --test-dir build-asan --output-on-failure -j"$jobs" \
  -E "install_package|build_tree_package|python|octave"

echo "== ThreadSanitizer: the threads test and the studies (run on threads) =="
cmake -S . -B build-tsan -DKINLOOP_WERROR=ON -DKINLOOP_TSAN=ON \
  -DKINLOOP_BUILD_BINDINGS=OFF -DKINLOOP_BUILD_EXAMPLES=OFF \
  -DCMAKE_BUILD_TYPE=Debug >/dev/null
cmake --build build-tsan -j"$jobs" --target test_threads test_study
TSAN_OPTIONS=halt_on_error=1 build-tsan/tests/test_threads
TSAN_OPTIONS=halt_on_error=1 build-tsan/tests/test_study

echo "== fuzz smoke run: 60 s per target =="
bash scripts/fuzz.sh 60

echo "test-all: every suite passed"
