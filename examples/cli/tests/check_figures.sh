#!/bin/sh
# cli_check_figures: what `kinloop check` reports of a quick-return press
# (its pressure angle below, against the closed form)
# (an offset slider-crank, numbers invented for this test): the time ratio
# by the trade's convention, slower stroke over faster (>= 1; common
# practice, no source), naming the slower stroke, against the dead-centre
# closed form: with crank r, rod l and offset e the block's extremes lie at
# crank angles asin(e / (l + r)) and pi + asin(e / (l - r)), so it rises
# through A = pi + asin(e / (l + r)) - asin(e / (l - r)) and returns
# through 2 pi - A (standard slider-crank kinematics).
# usage: check_figures.sh TOOL
set -eu
KINLOOP=$1
. "$(dirname "$0")/lib.sh"

cat >press.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
link rod
link ram
revolute shaft ground 0 0 crank 0 0
revolute crank_pin crank 30 0 rod 0 0
revolute wrist rod 100 0 ram 0 0
prismatic guide ground 0 12 axis 0 ram 0 0
input shaft
sketch angle rod -6
sketch slide guide 120
sweep shaft from 0 to 360 steps 72
MODEL

expect_status 0 "$KINLOOP" check press.kinloop
grep 'guide .*stroke' out.txt >stroke.txt || fail "no stroke line for the guide"
awk -v r=30 -v l=100 -v e=12 '
  function asin(x) { return atan2(x, sqrt(1 - x * x)) }
  {
    pi = atan2(0, -1)
    a = pi + asin(e / (l + r)) - asin(e / (l - r))
    want = (2 * pi - a) / a
    if (!match($0, /time ratio [0-9.]+/)) { print "no time ratio: " $0; exit 1 }
    got = substr($0, RSTART + 11, RLENGTH - 11) + 0
    if (got < 1) { print "time ratio below 1: " $0; exit 1 }
    if (got - want > 1e-4 || want - got > 1e-4) {
      print "time ratio " got ", closed form " want; exit 1
    }
    if (index($0, "slower: the return to the minimum") == 0) {
      print "the slower stroke is not named as the return: " $0; exit 1
    }
    angle = (2 * pi - a) * 180 / pi
    if (!match($0, /over [0-9.]+ deg of shaft/)) { print "no stroke angle: " $0; exit 1 }
    got = substr($0, RSTART + 5, RLENGTH - 5 - 13) + 0
    if (got - angle > 1e-3 || angle - got > 1e-3) {
      print "slower stroke over " got " deg, closed form " angle; exit 1
    }
  }' stroke.txt || fail "the press's time ratio is wrong"

# Sliders: the pressure angle between rod and direction of motion (0 is
# ideal), not a transmission angle at the wrist pin, which stands on the
# slide point; the rod stands at phi with sin phi = (e - r sin t) / l, the
# signed angle, from asin((e - r) / l) to asin((e + r) / l).
grep -q 'wrist .*transmission angle [0-9]' out.txt &&
  fail "the wrist pin still gets a transmission angle"
grep -q 'pushes weakly' out.txt && fail "a warning that the slider pushes weakly"
grep 'guide .*pressure angle' out.txt >pressure.txt ||
  fail "no pressure angle for the guide"
awk -v r=30 -v l=100 -v e=12 '
  function asin(x) { return atan2(x, sqrt(1 - x * x)) }
  {
    if (!match($0, /pressure angle [-0-9.e]+ to [-0-9.]+ deg/)) { print "no range: " $0; exit 1 }
    split(substr($0, RSTART + 15, RLENGTH - 19), v, " to ")
    k = 180 / atan2(0, -1)
    lo = asin((e - r) / l) * k
    hi = asin((e + r) / l) * k
    # printed to 4 digits: within half a unit of the last, 0.005 here
    if (v[1] - lo > 5e-3 || lo - v[1] > 5e-3 || v[2] - hi > 5e-3 || hi - v[2] > 5e-3) {
      print "pressure angle " v[1] " to " v[2] ", closed form " lo " to " hi; exit 1
    }
  }' pressure.txt || fail "the press's pressure angle is wrong"

# A named pair of lines (`transmission JOINT between J1 and J2`): the crank
# pin, which kinloop passes over on its own (an input crank), is reported
# with the named lines and marked; the chosen site at the elbow stays
# unmarked. Its smallest angle, at shaft 170 deg (invented four-bar: ground
# 100, crank 40, coupler 120, rocker 80), against the law of cosines on the
# diagonal BD from the crank pin to the rocker's pivot (common practice, no
# source): angle ABD + angle DBC.
cat >named.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
link coupler
link rocker
revolute shaft ground 0 0 crank 0 0
revolute crank_pin crank 40 0 coupler 0 0
revolute elbow coupler 120 0 rocker 80 0
revolute fulcrum rocker 0 0 ground 100 0
input shaft
sketch angle coupler 34
sketch angle rocker 63
transmission crank_pin between elbow and shaft
sweep shaft from 10 to 170 steps 16
MODEL

expect_status 0 "$KINLOOP" check named.kinloop
grep 'elbow .*transmission angle .*(lines to crank_pin and fulcrum)$' out.txt >/dev/null ||
  fail "the chosen site at the elbow is missing or marked as named"
grep 'crank_pin .*transmission angle' out.txt >named.txt ||
  fail "no transmission angle at the named crank pin"
grep -q '(lines to shaft and elbow, as the model names)' named.txt ||
  fail "the named site's lines or mark are not reported"
awk -v a=40 -v b=120 -v c=80 -v d=100 '
  function acos(x) { return atan2(sqrt(1 - x * x), x) }
  {
    pi = atan2(0, -1)
    t = 170 * pi / 180
    bd2 = a * a + d * d - 2 * a * d * cos(t)
    bd = sqrt(bd2)
    abd = acos((a * a + bd2 - d * d) / (2 * a * bd))
    dbc = acos((bd2 + b * b - c * c) / (2 * bd * b))
    want = (abd + dbc) * 180 / pi
    if (!match($0, /transmission angle [0-9.]+ to/)) { print "no range: " $0; exit 1 }
    got = substr($0, RSTART + 19, RLENGTH - 22) + 0
    if (index($0, "at shaft 170 and") == 0) { print "minimum not at 170 deg: " $0; exit 1 }
    # printed to 4 digits: within half a unit of the last, 0.005 here
    if (got - want > 5e-3 || want - got > 5e-3) {
      print "named angle " got ", law of cosines " want; exit 1
    }
  }' named.txt || fail "the named site's angle is wrong"
finish
