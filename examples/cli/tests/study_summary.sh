#!/bin/sh
# cli_study_summary: `kinloop study` prints, per output, the library's
# summary (kl_study_summarize) to the digits shown, which GSL's statistics
# of the samples confirm (check_study summary); the worst sample, the count
# within limits and the samples that did not assemble agree with the CSV;
# and the summary is the same on one thread and on two.
# usage: study_summary.sh TOOL CHECK_STUDY MODEL_FILE
set -eu
KINLOOP=$1
CHECK=$2
MODEL=$3
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

small_study "$MODEL"
expect_status 0 "$KINLOOP" study small.study --threads 2 --csv samples.csv \
  -o table2.txt
expect_status 0 "$CHECK" summary small.study table2.txt samples.csv
cat out.txt err.txt >&2
expect_status 0 "$KINLOOP" study small.study --threads 1
cp out.txt table1.txt
without_timing table1.txt >a.txt
# the -o summary has the line about the CSV as well
without_timing table2.txt | grep -v '^samples written to' >b.txt
cmp -s a.txt b.txt || fail "the summaries on one and two threads differ"
# the outline and what the samples did
for text in "study small.study" "samples        250" "outputs        4 judged" \
  "lengths in mm, angles in deg" "output stroke: limits 213.2 to 214.2" \
  "output reach: no limits" "first order  not estimated" \
  "outside the lower limit" "no limits given" "from the nominal" \
  "1 process x 1 thread"; do
  expect_text table1.txt "$text"
done
[ "$(grep -c '^throughput' table1.txt)" -eq 1 ] ||
  fail "not exactly one throughput line"
finish
