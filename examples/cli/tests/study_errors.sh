#!/bin/sh
# cli_study_errors: `kinloop study` exits with the tool's codes: 2 for a
# usage error, 3 for a study (or its model) that cannot be read, with
# FILE:LINE:COLUMN for a statement in error, 4 for a nominal that cannot be
# judged, 5 for an output that cannot be written; a study of no samples
# is no error.
# usage: study_errors.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP" study --help
expect_text out.txt "usage: kinloop study"
expect_status 0 "$KINLOOP" help study
expect_status 0 "$KINLOOP" --help
expect_text out.txt "study   a design study"

# 2: usage errors
expect_status 2 "$KINLOOP" study a.study b.study
expect_text err.txt "one study file at a time"
expect_status 2 "$KINLOOP" study --threads 65
expect_text err.txt "--threads wants a whole number from 0 to 64"
expect_status 2 "$KINLOOP" study --threads two
expect_status 2 "$KINLOOP" study --csv
expect_text err.txt "needs a value"
expect_status 2 "$KINLOOP" study --steps 3
expect_text err.txt "takes no option '--steps'"
expect_status 2 "$KINLOOP" check --threads 2
expect_text err.txt "takes no option '--threads'"

# 3: studies that cannot be read
expect_status 3 "$KINLOOP" study no-such.study
expect_text err.txt "kinloop: no-such.study: cannot open 'no-such.study'"
cat >axis.study <<STUDY
kinloop-study 1
model "$MODEL"
samples 10
vary joint crank_pin a z tolerance 0.1 normal
output stroke swing slide rail
STUDY
expect_status 3 "$KINLOOP" study axis.study
# 'z' is the 24th character of line 4
expect_text err.txt "axis.study:4:24: expected the local axis, x or y"
cat >limit.study <<STUDY
kinloop-study 1
model "$MODEL"
samples 10
vary joint crank_pin a x tolerance 0.1 normal
output stroke swing slide rail
limit strok 212 215
STUDY
expect_status 3 "$KINLOOP" study limit.study
expect_text err.txt "limit.study:6:7: no output is named 'strok'"
cat >nosuch.study <<'STUDY'
kinloop-study 1
model no-such.kinloop
samples 10
output stroke swing slide rail
STUDY
expect_status 3 "$KINLOOP" study nosuch.study
expect_text err.txt "nosuch.study:2:7: the model './no-such.kinloop'"
printf 'kinloop-model 1\nlink crank\nrevolute motor ground 0 0 crank zero 0\n' \
  >broken.kinloop
cat >broken.study <<'STUDY'
kinloop-study 1
model broken.kinloop
samples 10
output turn swing angle crank
STUDY
expect_status 3 "$KINLOOP" study broken.study
# the model's own error, with its line and column
expect_text err.txt "line 3, column 33: expected a number"
cat >whole.study <<STUDY
kinloop-study 1
model "$MODEL"
output stroke swing slide rail
STUDY
expect_status 3 "$KINLOOP" study whole.study
expect_text err.txt "kinloop: whole.study: a tolerance study says how many"

# 4: the nominal cannot be judged (geometry chosen for this test: the
# double-rocker of exit_codes.sh, whose crank stops at 82.82 deg)
fourbar_model rocker2.kinloop 80 30 90 0 100 60 120 30
cat >late.study <<'STUDY'
kinloop-study 1
model rocker2.kinloop
samples 10
vary joint crank_pin a x tolerance 0.1 normal
output late at 100 angle rocker
STUDY
expect_status 4 "$KINLOOP" study late.study
expect_text err.txt "late.study: the nominal model"

# 5: outputs that cannot be written
cat >ten.study <<STUDY
kinloop-study 1
model "$MODEL"
samples 10
vary joint crank_pin a x tolerance 0.1 normal
output stroke swing slide rail
STUDY
expect_status 5 "$KINLOOP" study ten.study --csv no-such-folder/s.csv
expect_text err.txt "cannot write 'no-such-folder/s.csv'"
touch blocker
expect_status 5 "$KINLOOP" study ten.study --charts blocker
expect_text err.txt "a file of that name is in the way"
expect_status 5 "$KINLOOP" study ten.study -o no-such-folder/t.txt
if [ -w /dev/full ]; then
  expect_status 5 "$KINLOOP" study ten.study -o /dev/full
fi

# no samples: a summary with nothing in it, and no error
cat >none.study <<STUDY
kinloop-study 1
model "$MODEL"
samples 0
vary joint crank_pin a x tolerance 0.1 normal
output stroke swing slide rail
limit stroke 212 215
STUDY
expect_status 0 "$KINLOOP" study none.study --csv none.csv --charts none
expect_text out.txt "samples        0"
expect_text out.txt "within limits  0 of 0          -"
[ "$(wc -l <none.csv)" -eq 1 ] || fail "none.csv is not a header alone"
finish
