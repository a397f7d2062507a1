#!/bin/sh
# cli_forces: `kinloop forces` and `kinloop sweep --forces`. A crank with a
# mass against the closed forms of uniform circular motion and of statics
# under its weight, in metres and in millimetres (the units docs/cli.md
# states); the demo's force columns against the library's force stage, row
# by row (check_forces); sweep --forces carrying the same columns; the
# charts well-formed and rendering; a declared redundancy and a singular
# position saying the forces are not determined, with no numbers; a motion
# limit; usage errors.
# usage: forces.sh TOOL CHECK_FORCES MODEL_FILE
set -eu
KINLOOP=$1
CHECK=$2
MODEL=$3
. "$(dirname "$0")/lib.sh"

# A crank (chosen for this test): 2 kg at r = 0.1 m from its pivot, 0.003
# kg m^2 about its centre, at w = 5 rad/s, g = 9.81 m/s^2 downward,
# coefficient of speed fluctuation 0.05; the same in millimetres.
crank_model() { # FILE LENGTH_UNIT R INERTIA G
  cat >"$1" <<MODEL
kinloop-model 1
units length $2 angle rad
link crank
revolute motor ground 0 0 crank 0 0
input motor
mass crank 2 at $3 0 inertia $4
gravity 0 -$5
speed motor 5 fluctuation 0.05
sweep motor from 0 to 6.283185307179586 steps 360
MODEL
}
crank_model crank-m.kinloop m 0.1 0.003 9.81
crank_model crank-mm.kinloop mm 100 3000 9810

expect_status 0 "$KINLOOP" forces crank-m.kinloop --csv crank-m.csv \
  --all-digits -o crank-m.txt
expect_status 0 "$KINLOOP" forces crank-mm.kinloop --csv crank-mm.csv \
  --all-digits -o crank-mm.txt
head -1 crank-m.csv | grep -qF "motor (rad),motor effort (N m),motor force x (N)" ||
  fail "crank-m.csv: header $(head -1 crank-m.csv)"
head -1 crank-mm.csv | grep -qF "motor (rad),motor effort (N mm),motor force x (N)" ||
  fail "crank-mm.csv: header $(head -1 crank-mm.csv)"
# Closed forms, at every row (u the crank angle): the motor holds the weight,
# T = m g r cos u; the pin gives the centre of mass its centripetal
# acceleration and carries the weight, F = m (-r w^2 cos u, -r w^2 sin u + g)
# (Newton's second law for a point mass on a circle at constant speed).
# In millimetres the torque is 1000 times the N m figure, forces the same N.
for f in m mm; do
  awk -F, -v k="$([ $f = mm ] && echo 1000 || echo 1)" '
    NR > 1 { m = 2; r = 0.1; w = 5; g = 9.81; u = $1
      t = m * g * r * cos(u) * k
      fx = -m * r * w * w * cos(u); fy = -m * r * w * w * sin(u) + m * g
      if (sqrt(($2 - t)^2) > 1e-9 * k || sqrt(($3 - fx)^2 + ($4 - fy)^2) > 1e-9 ||
          sqrt(($5 - sqrt(fx * fx + fy * fy))^2) > 1e-9) {
        printf "row %d: torque %s want %.12g, force (%s, %s) want (%.12g, %.12g)\n",
               NR, $2, t, $3, $4, fx, fy; bad = 1 } }
    END { exit bad }' "crank-$f.csv" || fail "crank-$f.csv differs from the closed forms"
done
[ "$(wc -l <crank-m.csv)" -eq 362 ] || fail "crank-m.csv: not a header and 361 rows"
# The summary: peak m g r = 1.962 N m at 0, RMS m g r / sqrt(2) = 1.387 N m
# (the trapezoid rule is exact for cos^2 over a period); the pin's largest
# load at the bottom, m r w^2 + m g = 24.62 N at 3 pi / 2; the work above
# the mean swings by 2 m g r = 3.924 J, so the flywheel I = 3.924 / (0.05 x
# 25) = 3.139 kg m^2 (common practice, no source)
expect_text crank-m.txt "motor               peak 1.962 N m at motor 0 rad; RMS 1.387 N m; mean 0 N m"
expect_text crank-m.txt "peak 24.62 N at motor 4.71239 rad"
expect_text crank-m.txt "energy fluctuation  3.924 N m"
expect_text crank-m.txt "flywheel inertia    3.139 kg m^2 at the motor shaft"
expect_text crank-mm.txt "motor               peak 1962 N mm at motor 0 rad; RMS 1387 N mm"
expect_text crank-mm.txt "flywheel inertia    3.139e+06 kg mm^2 (3.139 kg m^2)"
expect_text crank-mm.txt "lengths in mm, seconds: forces in N, torques and energies in N mm"
expect_text crank-m.txt "real machines need margins"

# The demo: its force columns against the library, and the report
expect_status 0 "$KINLOOP" forces "$MODEL" --csv demo.csv --charts charts \
  -o demo.txt
expect_status 0 "$CHECK" "$MODEL" demo.csv 72
cat out.txt err.txt >&2
for text in "input effort (what the motor must give)" \
  "joint loads (what the bearings carry)" "shaking force" "shaking moment" \
  "energy fluctuation" "flywheel inertia" "9 charts written in charts/" \
  "loads               2: (0, -15) N at tucker tip; (-40, 0) N at plate nose"; do
  expect_text demo.txt "$text"
done
check_svgs 9 charts/*.svg
grep -qF "peak" charts/load-1-crank_pin.svg || fail "the polar plot names no peak"

# sweep --forces: the kinematic columns, then the same force columns
expect_status 0 "$KINLOOP" sweep "$MODEL" --forces -o sweep.csv
expect_status 0 "$CHECK" "$MODEL" sweep.csv 72
kinematic=$("$KINLOOP" sweep "$MODEL" | head -1 | awk -F, '{ print NF }')
forces=$(head -1 demo.csv | awk -F, '{ print NF - 1 }')
awk -F, -v want=$((kinematic + forces)) 'NF != want { bad = 1 } END { exit bad }' \
  sweep.csv || fail "sweep --forces rows do not have $kinematic + $forces fields"
cut -d, -f$((kinematic + 1))- sweep.csv >tail-sweep.csv
cut -d, -f2- demo.csv >tail-forces.csv
cmp -s tail-sweep.csv tail-forces.csv ||
  fail "sweep --forces and forces --csv differ in their force columns"
# without a speed line the sweep's --speed is the working speed
grep -v '^speed' "$MODEL" >nospeed.kinloop
expect_status 2 "$KINLOOP" sweep nospeed.kinloop --forces
expect_text err.txt "no working speed for input motor"
expect_status 0 "$KINLOOP" sweep nospeed.kinloop --forces --speed 360 -o ns.csv
cut -d, -f$((kinematic + 1))- ns.csv >tail-ns.csv
cmp -s tail-ns.csv tail-forces.csv || fail "--speed 360 gives other forces"

# Not determined: a declared redundancy (a parallelogram with a third
# parallel crank, chosen for this test), and a change point on the way (a
# parallelogram, chosen for this test): a message, no figures, exit 4
cat >redundant.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link left
link middle
link right
link beam
revolute drive ground 0 0 left 0 0
revolute - ground 50 0 middle 0 0
revolute - ground 100 0 right 0 0
revolute - left 30 0 beam 0 0
revolute - middle 30 0 beam 50 0
revolute - right 30 0 beam 100 0
input drive
sketch angle left 60
sketch angle middle 60
sketch angle right 60
mass beam 1 at 50 0 inertia 900
speed drive 360
sweep drive from 30 to 150 steps 24
redundant 1
MODEL
expect_status 4 "$KINLOOP" forces redundant.kinloop
expect_text err.txt "the forces are not determined"
expect_text err.txt "redundant"
[ ! -s out.txt ] || fail "forces printed figures of an indeterminate model"
expect_status 4 "$KINLOOP" sweep redundant.kinloop --forces -o r.csv
expect_text err.txt "the forces are not determined"
[ ! -e r.csv ] || fail "sweep --forces wrote a CSV for an indeterminate model"
expect_status 0 "$KINLOOP" check redundant.kinloop
expect_text out.txt "1 redundant constraint declared: the joint forces are not determined"
cat >parallelogram.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
link coupler
link rocker
revolute motor ground 0 0 crank 0 0
revolute - crank 40 0 coupler 0 0
revolute - coupler 100 0 rocker 40 0
revolute - rocker 0 0 ground 100 0
input motor
sketch angle coupler 0
sketch angle rocker 60
mass coupler 0.5 at 50 0 inertia 400
speed motor 360
sweep motor from 60 to 240 steps 36
MODEL
expect_status 4 "$KINLOOP" forces parallelogram.kinloop
expect_text err.txt "the forces are not determined"
[ ! -s out.txt ] || fail "forces printed figures through a singular position"

# A motion limit: figures of the part reached, and a note (a triple-rocker
# chosen for this test: crank 70, coupler 50, rocker 60, ground 100)
fourbar_model limit.kinloop 70 50 60 30 90 35 170 60
echo "mass coupler 0.3 at 25 0 inertia 60" >>limit.kinloop
echo "speed motor 90" >>limit.kinloop
expect_status 0 "$KINLOOP" forces limit.kinloop --csv limit.csv
expect_text out.txt "the motion stops at motor"
rows=$(($(wc -l <limit.csv) - 1))
[ "$rows" -gt 1 ] && [ "$rows" -lt 61 ] || fail "limit.csv has $rows rows"

# Usage errors
expect_status 2 "$KINLOOP" forces nospeed.kinloop
expect_text err.txt "give --speed W"
expect_status 2 "$KINLOOP" forces "$MODEL" --fluctuation -0.1
expect_text err.txt "--fluctuation cannot be negative"
expect_status 2 "$KINLOOP" forces "$MODEL" --fluctuation lots
expect_status 0 "$KINLOOP" forces nospeed.kinloop --speed 720 --steps 36
expect_text out.txt "at 720 deg/s (120 rpm)"
expect_text out.txt "give a coefficient of speed fluctuation"
expect_status 0 "$KINLOOP" forces --help
expect_text out.txt "usage: kinloop forces"
finish
