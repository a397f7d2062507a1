#!/bin/sh
# cli_exit_codes: each kind of failure has its own exit status and a
# message that says what to do: 2 usage, 3 model (with line:column for a
# syntax error), 4 solve, 5 output file; 0 for help.
# usage: exit_codes.sh TOOL DEMO_MODEL
set -eu
KINLOOP=$1
DEMO=$2
. "$(dirname "$0")/lib.sh"

# help and version
expect_status 0 "$KINLOOP" --help
for text in "usage: kinloop" check solve sweep draw plot write demo \
  "0  success" "2  usage error" "3  model error" "4  solve failure" \
  "5  an output file"; do
  expect_text out.txt "$text"
done
for c in check solve sweep draw plot write demo; do
  expect_status 0 "$KINLOOP" $c --help
  expect_text out.txt "usage: kinloop $c"
  expect_status 0 "$KINLOOP" help $c
done
expect_status 0 "$KINLOOP" --version

# 2: usage errors
expect_status 2 "$KINLOOP" bogus
expect_text err.txt "unknown command 'bogus'"
expect_status 2 "$KINLOOP" model.kinloop
expect_text err.txt "try kinloop check FILE"
expect_status 2 "$KINLOOP" check "$DEMO" --frm 3
expect_text err.txt "unknown option '--frm'"
expect_status 2 "$KINLOOP" solve "$DEMO" --speed 3
expect_text err.txt "takes no option '--speed'"
expect_status 2 "$KINLOOP" sweep "$DEMO" --steps 0
expect_status 2 "$KINLOOP" sweep "$DEMO" --from abc
expect_status 2 "$KINLOOP" sweep "$DEMO" --from
expect_text err.txt "needs a value"
expect_status 2 "$KINLOOP" solve "$DEMO" --at 1,2
expect_text err.txt "1 input"
expect_status 2 "$KINLOOP" solve "$DEMO" --at x
expect_status 2 "$KINLOOP" plot "$DEMO"
expect_text err.txt "slide:rail"
expect_status 2 "$KINLOOP" plot "$DEMO" --show angle:nothing
expect_status 2 "$KINLOOP" plot "$DEMO" --show transmission:rocker_pin --order 1
expect_status 2 "$KINLOOP" plot "$DEMO" --show angle:rocker --show slide:rail
expect_text err.txt "one unit"
expect_status 2 "$KINLOOP" sweep "$DEMO" --input drive
expect_text err.txt "1 (motor)"
expect_status 2 "$KINLOOP" sweep "$DEMO" --from 10 --to 10
expect_status 2 "$KINLOOP" check a.kinloop b.kinloop
expect_status 2 "$KINLOOP" demo a.kinloop

# 3: model errors, a syntax error with its line and column
cat >syntax.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
revolute motor ground 0 0 crank zero 0
MODEL
expect_status 3 "$KINLOOP" check syntax.kinloop
# 'zero' is the 33rd character of line 4
expect_text err.txt "syntax.kinloop:4:33: expected a number"
cat >topology.kinloop <<'MODEL'
kinloop-model 1
link crank
link coupler
revolute motor ground 0 0 crank 0 0
revolute pin crank 1 0 coupler 0 0
MODEL
expect_status 3 "$KINLOOP" solve topology.kinloop
expect_text err.txt "topology.kinloop: "
expect_text err.txt "degrees of freedom"
expect_status 3 "$KINLOOP" sweep no-such-file.kinloop
expect_text err.txt "cannot read the model file 'no-such-file.kinloop'"

# 4: solve failures. A double-rocker (geometry chosen for this test:
# ground 100, crank 80, coupler 30, rocker 90); by the law of cosines its
# crank reaches from acos(0.8) = 36.87 deg (coupler folded on the rocker)
# to acos(0.125) = 82.82 deg (stretched along it).
fourbar_model rocker2.kinloop 80 30 90 0 100 60 120 30
expect_status 0 "$KINLOOP" solve rocker2.kinloop --at 80
expect_status 4 "$KINLOOP" solve rocker2.kinloop --at 90
expect_text err.txt "the motion stops at motor 82.8"
expect_status 4 "$KINLOOP" solve rocker2.kinloop --at 10
expect_text err.txt "the motion stops at motor 36.8"
expect_status 4 "$KINLOOP" draw rocker2.kinloop --pose 100
# check reports the limit as a warning and exits 0
expect_status 0 "$KINLOOP" check rocker2.kinloop
expect_text out.txt "the motion stops at motor 82.8"
# ... but a start that cannot be solved is a solve failure
expect_status 4 "$KINLOOP" check rocker2.kinloop --from 20 --to 60
expect_text out.txt "the start position cannot be solved"
expect_status 4 "$KINLOOP" sweep rocker2.kinloop --from 20 --to 60
expect_text err.txt "cannot reach motor 20 deg"

# 5: output files
expect_status 5 "$KINLOOP" sweep "$DEMO" -o no-such-folder/out.csv
expect_text err.txt "cannot write 'no-such-folder/out.csv'"
expect_status 5 "$KINLOOP" draw "$DEMO" -o no-such-folder/out.svg
expect_status 5 "$KINLOOP" write "$DEMO" -o no-such-folder/out.kinloop
touch blocker
expect_status 5 "$KINLOOP" demo --dir blocker
expect_text err.txt "a file of that name is in the way"
if [ -w /dev/full ]; then
  expect_status 5 "$KINLOOP" sweep "$DEMO" --steps 2000 -o /dev/full
fi
finish
