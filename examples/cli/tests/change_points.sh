#!/bin/sh
# cli_change_points: --through-change-points on sweep, plot, draw and check
# carries a parallelogram four-bar through its change point at 180 deg on
# the parallel branch and reports the passage; without it the motion stops
# there and says so. Checked against the parallelogram's closed form: on
# the parallel branch the rocker's angle equals the crank's and the coupler
# keeps its angle, 0 here (common practice, no source).
# usage: change_points.sh TOOL
set -eu
KINLOOP=$1
. "$(dirname "$0")/lib.sh"

# ground 100, crank 40, coupler 100, rocker 40: a parallelogram; 70 steps
# from 10 to 350 deg do not land on 180 deg
fourbar_model pg.kinloop 40 100 40 0 10 10 350 70

# the default: stop and report
expect_status 0 "$KINLOOP" sweep pg.kinloop -o stop.csv
expect_text err.txt "change point) at motor 180 deg"
expect_text err.txt "--through-change-points"
rows=$(($(wc -l <stop.csv) - 1))
[ "$rows" -eq 35 ] || fail "stopping at 180 deg should keep 35 rows, not $rows"

# through it: every step, one passage, the closed form on both sides
for dir in up down; do
  if [ $dir = up ]; then range="--from 10 --to 350"; else range="--from 350 --to 10"; fi
  # shellcheck disable=SC2086
  expect_status 0 "$KINLOOP" sweep pg.kinloop $range --steps 70 \
    --through-change-points --all-digits -o $dir.csv
  expect_text err.txt "passage 1 through a change point at motor 180 deg"
  rows=$(($(wc -l <$dir.csv) - 1))
  [ "$rows" -eq 71 ] || fail "$dir: $rows rows, expected 71"
  # columns: 1 motor, 5 coupler angle, 8 rocker angle (deg)
  awk -F, 'NR > 1 {
      d = $1 - $8; d -= 360 * int(d / 360)
      if (d > 180) d -= 360
      if (d < -180) d += 360
      if (d < 0) d = -d
      c = $5 < 0 ? -$5 : $5
      if (d > 1e-6 || c > 1e-6) { print "motor " $1 ": rocker " $8 ", coupler " $5; bad = 1 }
    } END { exit bad }' $dir.csv >bad.txt ||
    fail "$dir: off the parallel branch: $(head -3 bad.txt)"
done

# the other commands take the option and report the passage too
expect_status 0 "$KINLOOP" plot pg.kinloop --show angle:rocker \
  --through-change-points -o pg-plot.svg
expect_text err.txt "passage 1 through a change point"
expect_status 0 "$KINLOOP" draw pg.kinloop --through-change-points \
  --pose 270 -o pg-draw.svg
expect_text err.txt "passage 1 through a change point"
expect_status 0 "$KINLOOP" check pg.kinloop --through-change-points
expect_text out.txt "the whole range, no motion limit or singular position"
expect_status 0 "$KINLOOP" check pg.kinloop
expect_text out.txt "change point) at motor 180 deg"
check_svgs 2 pg-plot.svg pg-draw.svg
# the drawn position at 270 deg is on the parallel branch: the rocker pin
# 40 mm below the pivot at (100, 0)
grep -q 'data-joint="rocker_pin" cx="100\(\.0*[0-9]*\)\?" cy="-40' pg-draw.svg ||
  grep -q 'data-joint="rocker_pin" cx="99.99999' pg-draw.svg ||
  fail "the rocker pin at motor 270 deg is not at (100, -40)"
finish
