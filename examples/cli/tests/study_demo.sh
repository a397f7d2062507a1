#!/bin/sh
# cli_study_demo: `kinloop study` without a file runs the built-in demo
# study, which is examples/models/flap-tucker.study with its model: the
# same summary as running that file, but for the name in the first line
# and the throughput; the temporary folder it reads them from is removed.
# usage: study_demo.sh TOOL STUDY_FILE
set -eu
KINLOOP=$1
STUDY=$2
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

mkdir tmp
expect_status 0 env TMPDIR="$scratch/tmp" "$KINLOOP" study
cp out.txt built-in.txt
[ -z "$(ls tmp)" ] || fail "the demo left files in TMPDIR: $(ls tmp)"
head -n 1 built-in.txt >first.txt
expect_text first.txt "study flap-tucker.study (built in)"
expect_status 0 "$KINLOOP" study "$STUDY"
cp out.txt from-file.txt
without_timing built-in.txt | tail -n +2 >a.txt
without_timing from-file.txt | tail -n +2 >b.txt
cmp -s a.txt b.txt || {
  fail "the built-in demo study differs from $STUDY:"
  diff a.txt b.txt >&2 || true
}
for text in "samples        2000" "9 vary" "output stroke: limits 212.2 to 215.2" \
  "output torque: no limits"; do
  expect_text built-in.txt "$text"
done
finish
