#!/bin/sh
# cli_timeline: the timeline command runs a model's motion profile in time:
# a CSV row per time step with rates, accelerations and jerks per second,
# second squared and second cubed; a model without a profile exits with 3.
# usage: timeline.sh TOOL MODEL_WITH_PROFILE MODEL_WITHOUT
set -eu
KINLOOP=$1
WITH=$2
WITHOUT=$3
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP" timeline "$WITH" --steps 8 -o t.csv
expect_text t.csv "time s,motor deg,motor rate deg/s,motor accel deg/s^2,motor jerk deg/s^3"
expect_text t.csv "guide slide jerk mm/s^3"
expect_text t.csv "mark y jerk mm/s^3"
rows=$(wc -l < t.csv)
[ "$rows" -eq 10 ] || fail "t.csv has $rows lines, expected a header and 9 rows"
# Source: the cycloidal law's jerk at the start of a rise, 4 pi^2 h / T^3
# (published boundary value): h = 120 deg, T = 0.3 s at time 0.1 s
awk -F, 'NR == 3 {
  want = 4 * 3.14159265358979 ^ 2 * 120 / 0.3 ^ 3
  if ($1 != 0.1 || ($5 - want) ^ 2 > (1e-6 * want) ^ 2) exit 1
}' t.csv || fail "the jerk at the rise's start is not 4 pi^2 h / T^3"
# the last row at the profile's end, 0.8 s, back at rest
awk -F, 'END { if ($1 != 0.8 || $2 ^ 2 > 1e-12 || $3 ^ 2 > 1e-12) exit 1 }' \
  t.csv || fail "the last row is not the profile's end at rest"

# --charts: the driven input's and the point's x and y over time, each
# order its own chart (3 x 4), well-formed and rendering
expect_status 0 "$KINLOOP" timeline "$WITH" --steps 40 --charts charts -o /dev/null
check_svgs 12 charts/*.svg
expect_text charts/motor-jerk.svg "motor jerk (deg/s^3)"
expect_text charts/mark_y-accel.svg "time (s)"

# --rpm: turns a minute as the speed of a turning input (60 rpm = 360 deg/s)
expect_status 0 "$KINLOOP" sweep "$WITHOUT" --steps 6 --rpm 60 -o rpm.csv
expect_status 0 "$KINLOOP" sweep "$WITHOUT" --steps 6 --speed 360 -o deg.csv
cmp -s rpm.csv deg.csv || fail "--rpm 60 differs from --speed 360 deg/s"
expect_status 2 "$KINLOOP" sweep "$WITHOUT" --rpm 60 --speed 2
expect_text err.txt "give --speed or --rpm, not both"

expect_status 3 "$KINLOOP" timeline "$WITHOUT"
expect_text err.txt "has no motion profile in time"
expect_status 0 "$KINLOOP" timeline --help
expect_text out.txt "usage: kinloop timeline"

finish
