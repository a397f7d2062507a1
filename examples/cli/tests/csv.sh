#!/bin/sh
# cli_csv: `kinloop sweep` writes the header and one row per step, with the
# library's values (check_csv), in normal and full precision, scaled by a
# motor speed; on a fine sweep the rates and accelerations agree with
# central differences of the positions.
# usage: csv.sh TOOL CHECK_CSV MODEL_FILE
set -eu
KINLOOP=$1
CHECK=$2
MODEL=$3
. "$(dirname "$0")/lib.sh"
# The demo's transmission angles by the tool's rule (docs/cli.md), worked
# out by hand from its loops: rocker_pin with the lines to crank_pin and
# pivot, arm_pin with those to pivot and plate_pin.
SITES=rocker_pin:crank_pin:pivot,arm_pin:pivot:plate_pin

expect_status 0 "$KINLOOP" sweep "$MODEL" -o plain.csv
expect_status 0 "$CHECK" "$MODEL" plain.csv 72 1 6 $SITES
cat out.txt err.txt >&2
expect_status 0 "$KINLOOP" sweep "$MODEL" --speed 360 --all-digits -o full.csv
expect_status 0 "$CHECK" "$MODEL" full.csv 72 360 17 $SITES
cat out.txt err.txt >&2
expect_status 0 "$KINLOOP" sweep "$MODEL" --speed -90 --steps 3600 \
  --all-digits -o fine.csv
expect_status 0 "$CHECK" "$MODEL" fine.csv 3600 -90 17 $SITES fd
cat out.txt err.txt >&2
# standard output is the default
expect_status 0 "$KINLOOP" sweep "$MODEL" --steps 4
[ "$(wc -l <out.txt)" -eq 6 ] || fail "sweep --steps 4 to standard output: not 6 lines"
finish
