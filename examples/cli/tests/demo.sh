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
  "time ratio" "transmission angle" "force data" \
  "forces over a motor turn at the working speed" "360 steps at 360 deg/s (60 rpm)" \
  "input effort (what the motor must give)" "joint loads (what the bearings carry)" \
  "shaking force" "flywheel inertia" "real machines need margins" \
  "files written in kinloop-demo/"; do
  expect_text summary.txt "$text"
done
for f in flap-tucker.kinloop sweep.csv mechanism.svg plate.svg \
  plate-ratio.svg rocker.svg transmission.svg forces.csv \
  forces/effort-0-motor.svg forces/load-1-crank_pin.svg forces/load-frame.svg; do
  [ -s "kinloop-demo/$f" ] || fail "kinloop-demo/$f missing or empty"
done
[ "$(ls kinloop-demo/forces | wc -l)" -eq 9 ] ||
  fail "kinloop-demo/forces should hold the effort chart and 8 polar plots"
# the motor's peak torque in the summary is the largest of the CSV's
# (which samples every 5 deg, the summary every degree: not above it)
peak=$(sed -n 's/^  motor  *peak \([0-9.e+-]*\) N mm.*/\1/p' summary.txt)
awk -F, -v peak="$peak" 'NR == 1 { for (i = 1; i <= NF; i++)
    if ($i == "motor effort (N mm)") c = i }
  NR > 1 { v = $c < 0 ? -$c : $c; if (v > m) m = v }
  END { exit !(c && m <= peak * 1.0001 && m >= 0.9 * peak) }' \
  kinloop-demo/forces.csv || fail "the summary's peak $peak N mm and forces.csv disagree"
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
# the demo writes its study beside its model
expect_text other/place/flap-tucker.study "kinloop-study 1"
# a second demo run replaces its own model file
expect_status 0 "$KINLOOP" demo --dir other/place
finish
