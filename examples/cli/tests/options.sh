#!/bin/sh
# cli_options: one meaning of each option across commands, messages in the
# model's units with inputs numbered from 1, a model file for every
# command but demo, unknown options named, values below the model's
# resolution as 0, solve --all-digits, held inputs in model files, one
# limit on steps, no inf or nan in a drawing, decimal numbers only, and
# "-" for every figure of an empty study summary.
# usage: options.sh TOOL
set -eu
KINLOOP=$1
. "$(dirname "$0")/lib.sh"

# A five-bar with two inputs (an invented test geometry): cranks of 50 on
# ground pivots 60 apart, couplers of 70 meeting at the apex, where the
# point tip is; m2 held at 80 deg at the model's start.
cat >fb.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link left
link right
link lc
link rc
revolute m1 ground 0 0 left 0 0
revolute m2 ground 60 0 right 0 0
revolute e1 left 50 0 lc 0 0
revolute e2 right 50 0 rc 0 0
revolute apex lc 70 0 rc 70 0
point tip lc 70 0
input m1
input m2
sketch angle left 90
sketch angle right 90
sketch angle lc 65
sketch angle rc 115
hold m2 at 80
sweep m1 from 60 to 120 steps 12
MODEL

# the hold statement: read, used as the start, written, read back
expect_status 0 "$KINLOOP" solve fb.kinloop
expect_text out.txt "input m2 at 80 deg"
expect_status 0 "$KINLOOP" write fb.kinloop -o fb2.kinloop
expect_text fb2.kinloop "hold m2 at 80"
expect_status 0 "$KINLOOP" write fb2.kinloop -o fb3.kinloop
cmp -s fb2.kinloop fb3.kinloop || fail "the hold statement does not round-trip"
expect_status 0 "$KINLOOP" solve fb2.kinloop
expect_text out.txt "input m2 at 80 deg"

# draw: --at gives the other inputs, as everywhere; --pose the swept
# input's value; the drawn point lies on its drawn path
expect_status 0 "$KINLOOP" plot fb.kinloop --at 0,75 --show x:tip -o p.svg
expect_status 0 "$KINLOOP" draw fb.kinloop --at 0,75 --pose 90 -o d.svg
# 90 and 75 deg in rad
expect_text d.svg 'data-inputs="1.5707963267948966 1.3089969389957472"'
tr ' ' '\n' <d.svg | awk '
  /data-point="tip"/ { want = 1 }
  want && /^cx=/ { gsub(/[^-0-9.e]/, ""); px = $0 + 0 }
  want && /^cy=/ { gsub(/[^-0-9.e]/, ""); py = $0 + 0; want = 0; have = 1 }
  /^points="/ { inpath = 1; sub(/^points="/, "") }
  inpath && /,/ { split($0, xy, ","); xs[n] = xy[1] + 0; ys[n] = xy[2] + 0; n++ }
  inpath && /"/ { inpath = 0 }
  END {
    if (!have) exit 1
    for (i = 0; i < n; i++) {
      dx = xs[i] - px; dy = ys[i] - py
      if (dx * dx + dy * dy < 1e-10) exit 0
    }
    exit 1
  }' || fail "the drawn tip at m1 90 deg is not on its drawn path"
expect_status 2 "$KINLOOP" draw fb.kinloop --at 0,75 --at 0,80
expect_text err.txt "--at is given once"

# messages: the model's units, inputs numbered from 1
expect_status 2 "$KINLOOP" sweep fb.kinloop --input 0
expect_text err.txt "the inputs are 1 (m1), 2 (m2)"
expect_status 0 "$KINLOOP" sweep fb.kinloop --input 2 --from 70 --to 90 --steps 2
expect_text out.txt "m2 (deg)"
fourbar_model r2.kinloop 80 30 90 0 100 10 120 30
expect_status 4 "$KINLOOP" solve r2.kinloop
expect_text err.txt "no position at motor 10 deg"
expect_text err.txt "mm apart"
grep -q "input 0\|loop 0\|0\.1745" err.txt && fail "radians or numbering from 0: $(cat err.txt)"
# the library's own text, passed on unchanged, numbers loops as check lists
# them: a six-bar whose second loop cannot close at all (the arm and tie
# reach 40 mm from the rocker, the anchor lies 300 mm beyond its pivot)
cat >six.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
link coupler
link rocker
link arm
link tie
revolute motor ground 0 0 crank 0 0
revolute crank_pin crank 40 0 coupler 0 0
revolute rocker_pin coupler 120 0 rocker 80 0
revolute pivot rocker 0 0 ground 100 0
revolute elbow rocker 40 0 arm 0 0
revolute knee arm 20 0 tie 0 0
revolute anchor tie 20 0 ground 400 0
input motor
sketch angle coupler 60
sketch angle rocker 100
sweep motor from 30 to 60 steps 3
MODEL
expect_status 4 "$KINLOOP" solve six.kinloop --at 30
expect_text err.txt "input 1 (motor) = 30 deg"
loop=$(sed -n 's/.*loop \([0-9]*\) furthest from closing.*/\1/p' err.txt)
[ -n "$loop" ] || fail "the message names no loop: $(cat err.txt)"
expect_status 4 "$KINLOOP" check six.kinloop
grep -q "^  loop $loop .*anchor" out.txt ||
  fail "check's loop $loop is not the one through anchor: $(cat out.txt)"
# unstated units: the same text in radians, lengths without a unit
sed -e 's/^units .*$/units length unstated angle rad/' \
  -e 's/^\(sketch angle coupler\) 60/\1 1.0471975511965976/' \
  -e 's/^\(sketch angle rocker\) 100/\1 1.7453292519943295/' \
  -e 's/from 30 to 60/from 0.5235987755982988 to 1.0471975511965976/' \
  six.kinloop >six-rad.kinloop
expect_status 4 "$KINLOOP" solve six-rad.kinloop --at 0.5235987755982988
expect_text err.txt "input 1 (motor) = 0.5235987756 rad"
grep -q " deg\| mm " err.txt && fail "units the model does not state: $(cat err.txt)"

# a model file for every command but demo; unknown options named
for c in check solve sweep draw plot write forces; do
  expect_status 2 "$KINLOOP" $c
  expect_text err.txt "kinloop $c needs a model file"
done
expect_status 2 "$KINLOOP" --versoin
expect_text err.txt "unknown option '--versoin'"
expect_status 2 "$KINLOOP" --from 3
expect_text err.txt "needs a command before it"

# values below the resolution print as 0: a crank pin 40 mm out at 180
# deg has y = 40 sin(180 deg) = 0 (common practice, no source)
cat >crank.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
revolute motor ground 0 0 crank 0 0
point cp crank 40 0
input motor
MODEL
expect_status 0 "$KINLOOP" solve crank.kinloop --at 180
grep -q "^cp  *-40  *0  *0 " out.txt || fail "y of cp at 180 deg is not 0: $(grep '^cp' out.txt)"
expect_status 0 "$KINLOOP" solve crank.kinloop --at 30 --all-digits
# 40 cos(30 deg) = 20 sqrt(3) to 17 digits
expect_text out.txt "34.641016151377549"
expect_status 0 "$KINLOOP" sweep crank.kinloop --from 0 --to 180 --steps 1
tail -1 out.txt | grep -q "^180,.*,-40,0," || fail "sweep prints y at 180 deg as $(tail -1 out.txt)"

# one limit on steps: the option, a model's sweep statement, a study
expect_status 2 "$KINLOOP" sweep fb.kinloop --steps 10000001
expect_text err.txt "from 1 to 10000000, not '10000001'"
sed 's/steps 12/steps 1000000001/' fb.kinloop >many.kinloop
expect_status 3 "$KINLOOP" draw many.kinloop
expect_text err.txt "1000000001 steps; a sweep takes at most 10000000"
cat >many.study <<'STUDY'
kinloop-study 1
model fb.kinloop
samples 3
vary joint e1 a x tolerance 0.1 normal
sweep m1 from 60 to 120 steps 20000000
output reach_x max x tip
STUDY
expect_status 3 "$KINLOOP" study many.study
expect_text err.txt "at most 10000000"

# no inf or nan in a drawing: coordinates near 1e308 are refused
cat >big.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
revolute motor ground 0 0 crank 0 0
point far crank 1.7e308 0
input motor
sweep motor from 0 to 360 steps 8
MODEL
expect_status 3 "$KINLOOP" draw big.kinloop -o big.svg
expect_text err.txt "too large to draw"
[ -e big.svg ] && fail "a drawing of coordinates near 1e308 was written"

# decimal numbers only, as in model files
expect_status 2 "$KINLOOP" solve crank.kinloop --at 0x10
expect_text err.txt "value 1 is not a number"
expect_status 2 "$KINLOOP" sweep crank.kinloop --from 0x1p4 --to 90
expect_text err.txt "finite decimal number"
expect_status 2 "$KINLOOP" sweep crank.kinloop --from inf --to 90

# a summary with no values says "-" for every figure, never inf: no
# sample assembles with a pin moved by up to 5000 mm
cat >none.study <<'STUDY'
kinloop-study 1
model fb.kinloop
seed 7
samples 4
vary joint e1 a x tolerance 5000 uniform
sweep m1 from 85 to 95 steps 10
output reach_x max x tip
STUDY
expect_status 0 "$KINLOOP" study none.study
expect_text out.txt "not assembled  4 of 4"
grep -q "inf\|nan" out.txt && fail "an empty summary prints inf or nan: $(grep 'inf\|nan' out.txt)"
grep -q "^  min  *-  *max  *-" out.txt || fail "an empty summary's min and max are not '-'"
finish
