#!/bin/sh
# cli_joints: the joint markers of the tool's drawings stand where the
# library solves the joints (check_joints), for the demo's default
# positions, positions given with --at (one past a full turn), and a model
# with a slot joint.
# usage: joints.sh TOOL CHECK_JOINTS MODEL_FILE
set -eu
KINLOOP=$1
CHECK=$2
MODEL=$3
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP" draw "$MODEL" -o default.svg
expect_status 0 "$CHECK" "$MODEL" default.svg 4
cat out.txt err.txt >&2
expect_status 0 "$KINLOOP" draw "$MODEL" --pose 33.3 --pose 181 --pose 400 -o at.svg
expect_status 0 "$CHECK" "$MODEL" at.svg 3
cat out.txt err.txt >&2

# an inverted slider-crank with its block in a slot of a turning guide
# (geometry chosen for this test: crank 40 about the origin, guide pivoted
# at (100, 0))
cat >slotted.kinloop <<'MODEL'
kinloop-model 1
units length mm angle deg
link crank
link guide
revolute motor ground 0 0 crank 0 0
revolute pivot guide 0 0 ground 100 0
slot pin guide 0 0 axis 0 crank 40 0
point end guide 150 0
input motor
sketch angle guide 180
sketch slide pin 60
sweep motor from 0 to 360 steps 36
MODEL
expect_status 0 "$KINLOOP" draw slotted.kinloop --poses 5 -o slotted.svg
expect_status 0 "$CHECK" slotted.kinloop slotted.svg 5
cat out.txt err.txt >&2
finish
