#!/bin/sh
# cli_timeline: the timeline command runs a model's motion profile in time:
# a CSV row per time step with rates, accelerations and jerks per second,
# second squared and second cubed, the profile from the model or from
# --profile; a model without a profile exits with 3.
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
# --all-digits: the same rows with 17 significant digits
expect_status 0 "$KINLOOP" timeline "$WITH" --steps 8 --all-digits -o t17.csv
expect_all_digits t17.csv t.csv
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

# --profile: the profile on the command line. Source: the cycloidal law's
# published values, h = 30 deg over T = 0.5 s: jerk 4 pi^2 h / T^3 at the
# start, the peak rate 2 h / T at mid-rise; then a dwell at 30 to 0.75 s
expect_status 0 "$KINLOOP" timeline "$WITHOUT" --steps 6 -o p.csv \
  --profile "segment motor rise cycloidal 0.5 0 30; segment motor dwell 0.25 30"
rows=$(wc -l < p.csv)
[ "$rows" -eq 8 ] || fail "p.csv has $rows lines, expected a header and 7 rows"
awk -F, 'NR == 2 {
  want = 4 * 3.14159265358979 ^ 2 * 30 / 0.5 ^ 3
  if ($1 != 0 || ($5 - want) ^ 2 > (1e-6 * want) ^ 2) exit 1
}' p.csv || fail "--profile: the jerk at the rise's start is not 4 pi^2 h / T^3"
awk -F, 'NR == 4 { if ($1 != 0.25 || ($2 - 15) ^ 2 > 1e-12 ||
  ($3 - 120) ^ 2 > 1e-12) exit 1 }' p.csv ||
  fail "--profile: mid-rise is not at h / 2 with the rate 2 h / T"
awk -F, 'END { if ($1 != 0.75 || ($2 - 30) ^ 2 > 1e-12 || $3 ^ 2 > 1e-12) exit 1 }' \
  p.csv || fail "--profile: the last row is not the dwell's end at rest"
# given after a model's own segments, they extend its profile (0.8 s + 0.5 s)
expect_status 0 "$KINLOOP" timeline "$WITH" --steps 4 -o x.csv \
  --profile "segment motor dwell 0.5 0"
awk -F, 'END { if ($1 != 1.3) exit 1 }' x.csv ||
  fail "--profile did not extend the model's profile to 1.3 s"
# a segment that does not join: a model error naming the statement
expect_status 3 "$KINLOOP" timeline "$WITHOUT" \
  --profile "segment motor rise cycloidal 0.5 0 30; segment motor dwell 0.25 31"
expect_text err.txt "--profile statement 2:"
expect_status 3 "$KINLOOP" timeline "$WITHOUT" --profile "segment motor glide 1 0 1"
expect_text err.txt "--profile statement 1:"
expect_status 2 "$KINLOOP" sweep "$WITHOUT" --profile "segment motor dwell 1 0"
expect_text err.txt "takes no option '--profile'"

expect_status 3 "$KINLOOP" timeline "$WITHOUT"
expect_text err.txt "has no motion profile in time"
expect_status 0 "$KINLOOP" timeline --help
expect_text out.txt "usage: kinloop timeline"

finish
