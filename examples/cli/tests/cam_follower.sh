#!/bin/sh
# cli_cam_follower: the follower command and the 'cam' statement, against
# closed forms the project did not write (the models are made up for this
# test):
# - an eccentric circular disc cam (disc radius plus roller 45 mm, centre
#   15 mm off the shaft) with a translating roller follower offset 6 mm is
#   an offset slider-crank (crank e = 15, coupler L = 45, offset c = 6): the
#   roller centre is at y = e sin t + sqrt(L^2 - (c - e cos t)^2) (the
#   slider-crank closed form), and the pressure angle is the coupler's angle
#   from the slide axis, atan((e cos t - c) / (y - e sin t)) (the common
#   normal of disc and roller runs through the disc's centre);
# - a cam program (cycloidal rise, dwell, simple harmonic return, dwell):
#   the rise against the published laws, cycloidal s = h (x - sin(2 pi x) /
#   (2 pi)) and harmonic return s = h (1 + cos(pi x)) / 2 (from memory, as
#   in Norton's Design of Machinery, cam design chapter), and the pressure
#   angle against Norton's formula for a translating roller follower (from
#   memory): phi = atan((v - e) / (s + sqrt(Rp^2 - e^2))), v = ds/dtheta in
#   length per rad, Rp the prime circle radius, e the offset;
# - bad cam statements are refused with their line number.
# - the example cam lever (examples/models/cam-lever.kinloop) runs, its
#   lever swinging the program's 14 deg.
# usage: cam_follower.sh TOOL EXAMPLE_MODEL
set -eu
KINLOOP=$1
EXAMPLE=$2
. "$(dirname "$0")/lib.sh"

cat >disc.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link disc
link stem
revolute shaft ground 0 0 disc 0 0
prismatic guide ground 6 0 axis 90 stem 0 0
arc-slot track disc 15 0 radius 45 stem 0 0
input shaft
sketch slide guide 44.0908
sketch slide track 79.75
speed shaft 720
MODEL

expect_status 0 "$KINLOOP" follower disc.kinloop --cam track --steps 72 \
  -o disc.csv
expect_text disc.csv "track velocity (mm/s)"
# columns: 2 cam angle, 3 rise, 4 d rise / d cam angle (mm/deg), 7 velocity
# (mm/s at 720 deg/s), 10 pressure angle; the rise counts from the lowest
# roller centre of the rows (the CSV has 9 significant digits)
awk -F, 'NR > 1 {
  pi = atan2(0, -1); t = $2 * pi / 180; e = 15; L = 45; c = 6
  u = c - e * cos(t); w = sqrt(L * L - u * u); y = e * sin(t) + w
  dy = e * cos(t) - u * e * sin(t) / w
  phi = atan2(e * cos(t) - c, y - e * sin(t)) * 180 / pi
  n++; rise[n] = $3; want[n] = y; row[n] = NR
  if (n == 1 || y < low) low = y
  check("d1", $4, dy * pi / 180, 1e-9)
  check("velocity", $7, dy * 4 * pi, 1e-6)
  check("pressure", $10, phi, 1e-6)
}
function check(what, got, want, tol,  d) {
  d = got - want; if (d < 0) d = -d
  if (d > tol) { print "row " NR ": " what " " got ", expected " want; bad = 1 }
}
END {
  for (k = 1; k <= n; k++) { NR = row[k]; check("rise", rise[k], want[k] - low, 1e-6) }
  exit bad
}' disc.csv || fail "the disc cam does not follow the offset slider-crank"

# without --cam, a model with no cam statement has nothing to read
expect_status 3 "$KINLOOP" follower disc.kinloop
expect_text err.txt "no 'cam' line"
# a joint that is no cam pair is refused
expect_status 3 "$KINLOOP" follower disc.kinloop --cam shaft
expect_text err.txt "shaft cannot be read as a cam"

cat >lobe.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link cam
link follower
revolute shaft ground 0 0 cam 0 0
prismatic stem ground 10 0 axis 90 follower 0 0
cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 limit 35 program rise cycloidal 120 25 dwell 60 return harmonic 120 25 dwell 60
input shaft
sketch slide stem 48.98979485566356
MODEL

expect_status 0 "$KINLOOP" follower lobe.kinloop --charts charts -o lobe.csv
# columns: 2 cam angle, 3 rise, 4 d rise / d cam angle (mm/deg), 7 pressure;
# the pitch curve is a spline through 720 points, so the motion is the
# program's to within its interpolation
awk -F, 'NR > 1 {
  pi = atan2(0, -1); a = $2; h = 25
  if (a <= 120) { x = a / 120; s = h * (x - sin(2 * pi * x) / (2 * pi))
    v = h / (120 * pi / 180) * (1 - cos(2 * pi * x)) }
  else if (a <= 180) { s = h; v = 0 }
  else if (a <= 300) { x = (a - 180) / 120; s = h * (1 + cos(pi * x)) / 2
    v = -h * pi / (2 * 120 * pi / 180) * sin(pi * x) }
  else { s = 0; v = 0 }
  phi = atan2(v - 10, s + sqrt(50 * 50 - 10 * 10)) * 180 / pi
  check("rise", $3, s, 2e-4)
  check("d1", $4 * 180 / pi, v, 0.05)
  check("pressure", $7, phi, 0.05)
}
function check(what, got, want, tol,  d) {
  d = got - want; if (d < 0) d = -d
  if (d > tol) { print "row " NR ": " what " " got ", expected " want; bad = 1 }
}
END { exit bad }' lobe.csv || fail "the cam program's motion or pressure angle is off"
# --all-digits: the same rows with 17 significant digits
expect_status 0 "$KINLOOP" follower lobe.kinloop -o lobe17.csv --all-digits
expect_all_digits lobe17.csv lobe.csv
for f in rise d1 d2 d3 pressure; do
  [ -s "charts/lobe-$f.svg" ] || fail "no chart charts/lobe-$f.svg"
done
expect_text charts/lobe-pressure.svg "largest"
expect_text charts/lobe-pressure.svg "bound 35 deg"

# check reports the cam's follower pressure angle (Norton's formula above
# puts its largest, -25.78 deg, in the return at 252 deg), not a slider's
expect_status 0 "$KINLOOP" check lobe.kinloop
expect_text out.txt "lobe          cam on shaft: follower pressure angle -25.78 to 12.8"
expect_text out.txt "largest at shaft 252 deg (bound 35 deg)"
expect_text out.txt "warnings: none"
# a guide 2 mm off the stem line the cam was made for is warned of with its
# distance (the lines x = 12 and x = 10 about the bearing); a revolute guide
# for a translating follower is of the wrong kind
sed 's/^prismatic stem ground 10 0/prismatic stem ground 12 0/' lobe.kinloop >moved.kinloop
expect_status 0 "$KINLOOP" check moved.kinloop
expect_text out.txt "the follower of cam lobe is guided 2 mm and 0 deg away from the follower its cam line describes"
sed 's/^prismatic stem ground 10 0 axis 90 follower 0 0/revolute stem ground 60 0 follower 50 0/; s/^sketch slide .*/sketch angle follower -53.13/' \
  lobe.kinloop >pivoted.kinloop
expect_status 0 "$KINLOOP" check pivoted.kinloop
expect_text out.txt "cam lobe was made for another kind of follower than its guide"

# the canonical writer writes the cam statement back: read, write, read and
# write again gives the same text
expect_status 0 "$KINLOOP" write lobe.kinloop -o once.kinloop
expect_status 0 "$KINLOOP" write once.kinloop -o twice.kinloop
cmp -s once.kinloop twice.kinloop || fail "the cam statement does not round-trip"
expect_text once.kinloop "cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 limit 35 program rise cycloidal"

# bad cam statements, each refused at its line (7)
bad() {
  sed "s/^cam lobe .*/$1/" lobe.kinloop >bad.kinloop
  expect_status 3 "$KINLOOP" check bad.kinloop
  expect_text err.txt "bad.kinloop:7:"
  expect_text err.txt "$2"
}
bad "cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 program rise cycloid 120 25 dwell 240" \
  "expected a motion law"
bad "cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 program rise cycloidal 120 25 return harmonic 120 25 dwell 60" \
  "not one turn (360 deg)"
bad "cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 program rise cycloidal 120 25 return harmonic 240 20" \
  "the follower must come back"
bad "cam lobe shaft follower 0 0 points 720 translating base 0 roller 10 offset 10 program rise cycloidal 120 25 return harmonic 240 25" \
  "base radius 0 is not positive"
# a sharp rise under a large roller: the roller undercuts the cam
bad "cam lobe shaft follower 0 0 points 720 translating base 5 roller 30 offset 0 program rise cycloidal 30 25 return cycloidal 330 25" \
  "undercuts the cam at cam angle"
bad "cam lobe shaft follower 0 0 points 720 translating base 40 roller 10 offset 10 limit 10 program rise cycloidal 120 25 dwell 60 return harmonic 120 25 dwell 60" \
  "above the bound 10 deg"

# the example: an oscillating follower that drives a pusher; the rise is
# the arm's angle, the program's 14 deg lift at the 720 deg/s of its speed
expect_status 0 "$KINLOOP" follower "$EXAMPLE" --charts lever -o lever.csv
expect_text lever.csv "track rise (deg)"
awk -F, 'NR > 1 && $3 > top { top = $3 }
END { d = top - 14; if (d < 0) d = -d; exit d > 1e-3 }' lever.csv ||
  fail "the example lever does not swing 14 deg"
[ -s lever/track-jerk.svg ] || fail "no jerk chart in time for the example"
expect_status 0 "$KINLOOP" draw "$EXAMPLE" -o lever.svg
expect_text lever.svg 'class="cam"'
expect_text lever.svg 'class="roller"'

exit "$failures"
