#!/usr/bin/env bash
# Line and function coverage of lib/ by every test (gcov through lcov):
# prints the summary and the functions and lines no test reaches. The
# counters are updated atomically: studies count from several threads.
set -euo pipefail
cd "$(dirname "$0")/.."
cmake -S . -B build-coverage -DCMAKE_BUILD_TYPE=Debug \
  -DCMAKE_C_FLAGS="--coverage -fprofile-update=atomic -O0" -DKINLOOP_BUILD_BINDINGS=ON >/dev/null
cmake --build build-coverage -j2 >/dev/null
lcov --quiet --zerocounters --directory build-coverage
ctest --test-dir build-coverage -j2 -E "install_package" >/dev/null || {
  echo "coverage: a test failed; fix it first" >&2
  exit 1
}
lcov --quiet --capture --directory build-coverage --output-file build-coverage/all.info \
  --rc lcov_branch_coverage=0 2>/dev/null
lcov --quiet --extract build-coverage/all.info "$PWD/lib/*" \
  --output-file build-coverage/lib.info
lcov --summary build-coverage/lib.info 2>&1 | grep -E "lines|functions"
echo "functions no test calls:"
awk -F'[:,]' '/^SF:/{file=$2} /^FNDA:0,/{sub(".*/","",file); print "  " file ": " $3}' \
  build-coverage/lib.info
echo "lines no test reaches, per file:"
awk -F'[:,]' '/^SF:/{file=$2; sub(".*/","",file)} /^DA:/{if ($3 == 0) miss[file] = miss[file] " " $2}
  END {for (f in miss) print "  " f ":" miss[f]}' build-coverage/lib.info | sort
