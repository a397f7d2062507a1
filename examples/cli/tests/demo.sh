#!/bin/sh
# cli_demo: `kinloop` with no arguments prints the demo's summary, writes
# its files into ./kinloop-demo/ and exits 0; `kinloop demo --dir` writes
# elsewhere; the embedded model is the file in examples/models, byte for
# byte.
# usage: demo.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP"
cp out.txt summary.txt
# Grashof's condition for the demo's four-bar (ground 220, crank 60,
# coupler 200, rocker 150): s + l = 60 + 220 = 280 < p + q = 200 + 150,
# with the input shortest: a crank-rocker.
for text in "Flap-tucking station" "1 degree of freedom" "2 independent loops" \
  "loop 1" "loop 2" "crank-rocker" "no motion limit" "stroke" \
  "time ratio" "transmission angle" "worst motor torque" \
  "files written in kinloop-demo/"; do
  expect_text summary.txt "$text"
done
for f in flap-tucker.kinloop sweep.csv mechanism.svg plate.svg \
  plate-ratio.svg rocker.svg transmission.svg; do
  [ -s "kinloop-demo/$f" ] || fail "kinloop-demo/$f missing or empty"
done
cmp -s kinloop-demo/flap-tucker.kinloop "$MODEL" ||
  fail "the embedded demo model differs from $MODEL"
[ "$(wc -l <kinloop-demo/sweep.csv)" -eq 74 ] ||
  fail "sweep.csv should have a header and 73 rows"

# a second run over the same folder, and another folder
expect_status 0 "$KINLOOP"
# the folder is made, but not its parents
expect_status 5 "$KINLOOP" demo --dir other/place
expect_text err.txt "cannot make the folder 'other/place'"
mkdir other
expect_status 0 "$KINLOOP" demo --dir other/place
[ -s other/place/mechanism.svg ] || fail "demo --dir wrote no drawing"
# with a command but no model file, a command works on the demo
expect_status 0 "$KINLOOP" check
expect_text out.txt "model flap-tucker.kinloop"
finish
