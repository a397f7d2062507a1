#!/bin/sh
# cli_reach: kinloop reach traces the workspace of a five-bar's pen: the
# SVG is well-formed and renders, the area it prints is the closed form's
# (the intersection of two annuli, derived in tests/test_workspace.c: the
# lens two crossing disks share, less the two holes, common practice, no
# source), and bad input has its own exit status and message.
# usage: reach.sh TOOL DEMO_MODEL
set -eu
KINLOOP=$1
DEMO_MODEL=$2
. "$(dirname "$0")/lib.sh"

# geometry chosen for this test: cranks 100 and 80 mm about (0, 0) and
# (120, 0), arms 150 and 140 mm; annuli 50..250 about the first pivot and
# 60..220 about the second
cat >fivebar.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link "left crank"
link "right crank"
link "left arm"
link "right arm"
revolute left_motor ground 0 0 "left crank" 0 0
revolute right_motor ground 120 0 "right crank" 0 0
revolute left_elbow "left crank" 100 0 "left arm" 0 0
revolute right_elbow "right crank" 80 0 "right arm" 0 0
revolute wrist "left arm" 150 0 "right arm" 140 0
point pen "left arm" 150 0
input left_motor
input right_motor
sketch angle "left arm" 60
sketch angle "right arm" 120
MODEL

expect_status 0 "$KINLOOP" reach fivebar.kinloop --point pen -o reach.svg
expect_text reach.svg "workspace of pen"
expect_text reach.svg "workspace-boundary"
# the area within 1e-4 of the closed form, computed here by awk
area=$(sed -n 's/^workspace of pen: area \([0-9.e+]*\) mm^2.*/\1/p' out.txt)
awk -v a="$area" 'BEGIN {
  pi = atan2(0, -1); r1 = 250; r2 = 220; d = 120
  c1 = (d * d + r1 * r1 - r2 * r2) / (2 * d * r1)
  c2 = (d * d + r2 * r2 - r1 * r1) / (2 * d * r2)
  lens = r1 * r1 * atan2(sqrt(1 - c1 * c1), c1) + \
         r2 * r2 * atan2(sqrt(1 - c2 * c2), c2) - \
         0.5 * sqrt((-d + r1 + r2) * (d + r1 - r2) * (d - r1 + r2) * (d + r1 + r2))
  want = lens - pi * (50 * 50 + 60 * 60)
  if (a == "" || (a - want) / want > 1e-4 || (want - a) / want > 1e-4) {
    printf "area %s, closed form %.9g\n", a, want; exit 1
  }
}' || fail "the area printed is not the closed form's"
# to standard output: the SVG alone there, the figures on standard error
expect_status 0 "$KINLOOP" reach fivebar.kinloop --point pen --grid 16
expect_text out.txt "<svg"
expect_text err.txt "workspace of pen: area"
cp out.txt stdout.svg

# bad input: no point, an unknown one, a grid out of range, a model with
# one input (the demo), a point on ground
expect_status 2 "$KINLOOP" reach fivebar.kinloop
expect_text err.txt "--point"
expect_status 2 "$KINLOOP" reach fivebar.kinloop --point nib
expect_text err.txt "no point 'nib'"
expect_status 2 "$KINLOOP" reach fivebar.kinloop --point pen --grid 2
expect_status 3 "$KINLOOP" reach "$DEMO_MODEL" --point "tucker tip"
expect_text err.txt "two inputs"
sed 's/^point pen "left arm" 150 0$/point post ground 10 10/' fivebar.kinloop \
  >post.kinloop
expect_status 3 "$KINLOOP" reach post.kinloop --point post
expect_text err.txt "on ground"

check_svgs 2 reach.svg stdout.svg
finish
