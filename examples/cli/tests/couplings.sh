#!/bin/sh
# cli_couplings: a geared five-bar (the right crank geared to the left by an
# external pair of radii 40 and 60, a model made up for this test) shows its
# gear pair in check, and its sweep turns the right crank at -40/60 of the
# motor, counted from the sketch (the rolling condition r1 dphi1 = -r2 dphi2).
# usage: couplings.sh TOOL
set -eu
KINLOOP=$1
. "$(dirname "$0")/lib.sh"

cat >geared.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link left_crank
link right_crank
link left_arm
link right_arm
revolute motor ground 0 0 left_crank 0 0
revolute right_pivot ground 100 0 right_crank 0 0
revolute left_elbow left_crank 30 0 left_arm 0 0
revolute right_elbow right_crank 35 0 right_arm 0 0
revolute tip_pin left_arm 90 0 right_arm 85 0
point tip left_arm 90 0
input motor
gears motor right_pivot 40 60
sketch angle left_crank 90
sketch angle right_crank 90
sketch angle left_arm 30
sketch angle right_arm 150
sweep motor from 90 to 450 steps 36
MODEL

expect_status 0 "$KINLOOP" check geared.kinloop
expect_text out.txt "couplings     1 (each takes one freedom)"
expect_text out.txt "gear pair motor (r 40) with right_pivot (r 60) on ground, external mesh"
expect_text out.txt "right_elbow   no transmission angle"

expect_status 0 "$KINLOOP" sweep geared.kinloop -o geared.csv
# columns 1 and 5: the motor and the right crank's angle, in degrees
awk -F, 'NR > 1 {
  want = 90 - 40.0 / 60.0 * ($1 - 90)
  d = $5 - want; if (d < 0) d = -d
  if (d > 1e-3) { print "row " NR ": right crank " $5 ", expected " want; bad = 1 }
} END { exit bad }' geared.csv || fail "the right crank does not follow the gear ratio"

# a model whose gears cannot mesh is refused with the line of the statement
sed 's/gears motor right_pivot 40 60/gears motor right_pivot 40 50/' \
  geared.kinloop >nomesh.kinloop
expect_status 3 "$KINLOOP" check nomesh.kinloop
expect_text err.txt "nomesh.kinloop:14:"

exit "$failures"
