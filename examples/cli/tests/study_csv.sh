#!/bin/sh
# cli_study_csv: `kinloop study --csv` writes a header and one row per
# sample (index, status, every dimension, every output) holding the
# library's own numbers to the last bit (check_study csv), whatever the
# number of threads.
# usage: study_csv.sh TOOL CHECK_STUDY MODEL_FILE
set -eu
KINLOOP=$1
CHECK=$2
MODEL=$3
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

small_study "$MODEL"
expect_status 0 "$KINLOOP" study small.study --threads 2 --csv two.csv
expect_text out.txt "samples written to two.csv, one row each"
expect_status 0 "$CHECK" csv small.study two.csv
cat out.txt err.txt >&2
expect_status 0 "$KINLOOP" study small.study --threads 1 --csv=one.csv
cmp -s one.csv two.csv || fail "the CSV on one and two threads differ"
[ "$(wc -l <one.csv)" -eq 251 ] || fail "one.csv: not a header and 250 rows"
head -n 1 one.csv >header.txt
expect_text header.txt \
  'sample,status,crank_pin a x (mm),rocker_pin b x (mm),pivot b y (mm),tucker tip y (mm),stroke (mm),mu_min (deg),tip_low (mm),reach (deg)'
finish
