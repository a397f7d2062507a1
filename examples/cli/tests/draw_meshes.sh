#!/bin/sh
# cli_draw_meshes: draw shows gears as pitch circles and racks as pitch
# lines. A geared five-bar (the right crank geared to the left by an
# external pair of radii 40 and 60, as in couplings.sh) whose right crank
# also drives a rack on ground (a model made up for this test): in every
# position drawn, the pitch circles sit on their joints with their radii,
# the rack's pitch line is tangent to the right pitch circle, and the
# drawn radii and the pitch line move by the rolling conditions
# r1 dphi1 = -r2 dphi2 (external mesh) and ds = r dphi (rack); rolling
# without slip at the pitch point, common practice, no source. The SVG is
# well-formed and renders (check_svgs, as svg.sh).
# usage: draw_meshes.sh TOOL
set -eu
KINLOOP=$1
. "$(dirname "$0")/lib.sh"

cat >meshes.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link left_crank
link right_crank
link left_arm
link right_arm
link rack_bar
revolute motor ground 0 0 left_crank 0 0
revolute right_pivot ground 100 0 right_crank 0 0
revolute left_elbow left_crank 30 0 left_arm 0 0
revolute right_elbow right_crank 35 0 right_arm 0 0
revolute tip_pin left_arm 90 0 right_arm 85 0
prismatic runner ground 0 -75 axis 0 rack_bar 0 0
point tip left_arm 90 0
input motor
gears motor right_pivot 40 60
rack right_pivot runner 60
sketch angle left_crank 90
sketch angle right_crank 90
sketch angle left_arm 30
sketch angle right_arm 150
sweep motor from 90 to 180 steps 18
MODEL

expect_status 0 "$KINLOOP" draw meshes.kinloop -o meshes.svg
# four positions: per position the two gears' circles and the rack's
# pinion circle, and one pitch line
[ "$(grep -c 'class="pitch-circle"' meshes.svg)" -eq 12 ] ||
  fail "meshes.svg: $(grep -c 'class="pitch-circle"' meshes.svg) pitch circles, expected 12"
[ "$(grep -c 'class="pitch-line" data-joint="runner"' meshes.svg)" -eq 4 ] ||
  fail "meshes.svg: expected 4 pitch lines of the rack"

# one attribute's value from an SVG element's line
awk '
BEGIN { n = 0 }
function attr(line, name,   s) {
  if (!match(line, " " name "=\"[^\"]*\"")) return "";
  s = substr(line, RSTART + length(name) + 3, RLENGTH - length(name) - 4);
  return s + 0
}
function near(a, b) { d = a - b; if (d < 0) d = -d; return d < 1e-6 }
function turn(a) {   # to (-pi, pi]
  while (a > 3.14159265358979) a -= 6.28318530717959
  while (a <= -3.14159265358979) a += 6.28318530717959
  return a
}
/class="pitch-circle" data-joint="motor"/ {
  if (!near(attr($0, "cx"), 0) || !near(attr($0, "cy"), 0) || !near(attr($0, "r"), 40)) {
    print "motor pitch circle: " $0; bad = 1 }
}
/class="pitch-circle" data-joint="right_pivot"/ {
  if (!near(attr($0, "cx"), 100) || !near(attr($0, "cy"), 0) || !near(attr($0, "r"), 60)) {
    print "right pitch circle: " $0; bad = 1 }
}
/class="pitch-radius" data-joint="motor"/ {
  motor[n] = atan2(attr($0, "y2") - attr($0, "y1"), attr($0, "x2") - attr($0, "x1"))
}
/class="pitch-radius" data-joint="right_pivot"/ {
  right[n] = atan2(attr($0, "y2") - attr($0, "y1"), attr($0, "x2") - attr($0, "x1"))
}
/class="pitch-line"/ {
  # tangent below the right pitch circle, along x
  if (!near(attr($0, "y1"), -60) || !near(attr($0, "y2"), -60)) {
    print "pitch line off the pitch circle: " $0; bad = 1 }
  rack[n] = attr($0, "x1"); n++
}
END {
  if (n != 4) { print n " positions read"; exit 1 }
  for (k = 1; k < n; k++) {
    dm = turn(motor[k] - motor[k - 1]); dr = turn(right[k] - right[k - 1])
    if (!near(40 * dm, -60 * dr)) {
      print "positions " k - 1 ", " k ": gears turn " dm ", " dr; bad = 1 }
    if (!near(rack[k] - rack[k - 1], 60 * dr)) {
      print "positions " k - 1 ", " k ": pitch line moves " rack[k] - rack[k - 1] \
            ", the pitch circle " 60 * dr; bad = 1 }
  }
  exit bad
}' meshes.svg || fail "the pitch circles and the pitch line do not roll together"

check_svgs 1 meshes.svg
finish
