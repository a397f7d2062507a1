#!/bin/sh
# cli_study_demo: `kinloop study` needs a study file; `kinloop demo` writes
# the built-in demo study beside its model, and that copy runs to the same
# summary as examples/models/flap-tucker.study, but for the name in the
# first line and the throughput.
# usage: study_demo.sh TOOL STUDY_FILE
set -eu
KINLOOP=$1
STUDY=$2
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

expect_status 2 "$KINLOOP" study
expect_text err.txt "kinloop study needs a study file"
expect_status 0 "$KINLOOP" demo --dir demo
expect_status 0 "$KINLOOP" study demo/flap-tucker.study
cp out.txt built-in.txt
head -n 1 built-in.txt >first.txt
expect_text first.txt "study demo/flap-tucker.study"
expect_status 0 "$KINLOOP" study "$STUDY"
cp out.txt from-file.txt
without_timing built-in.txt | tail -n +2 >a.txt
without_timing from-file.txt | tail -n +2 >b.txt
cmp -s a.txt b.txt || {
  fail "the demo's study differs from $STUDY:"
  diff a.txt b.txt >&2 || true
}
for text in "samples        2000" "9 vary" "output stroke: limits 212.2 to 215.2" \
  "output torque: no limits"; do
  expect_text built-in.txt "$text"
done
finish
