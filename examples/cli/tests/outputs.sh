#!/bin/sh
# cli_outputs: no output file is replaced until it is complete. A run that
# fails, or is killed part-way (SIGTERM, SIGKILL), leaves the earlier file
# as it was, and after SIGTERM no temporary file either; a file that reads
# as a model or study file is not written over without --write-over.
# usage: outputs.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"

cp "$MODEL" m.kinloop
no_temps() {
  ls -a | grep -q 'tmp-' && fail "$1: temporary files left: $(ls | grep tmp-)"
  return 0
}

# a complete run replaces the file, and leaves no temporary file
echo precious >result.csv
expect_status 0 "$KINLOOP" sweep m.kinloop --steps 4 -o result.csv
expect_text result.csv "motor (deg)"
no_temps "a complete sweep"

# a run that fails after starting to write: the overflow of a rate
echo precious >result.csv
expect_status 4 "$KINLOOP" sweep m.kinloop --steps 4 --speed 1e300 -o result.csv
expect_text err.txt "nothing written"
[ "$(cat result.csv)" = precious ] || fail "a failed sweep changed result.csv"
no_temps "a failed sweep"

# killed mid-way, politely and not
for sig in TERM KILL; do
  echo precious >result.csv
  "$KINLOOP" sweep m.kinloop --steps 10000000 -o result.csv 2>/dev/null &
  pid=$!
  sleep 1
  kill -$sig $pid 2>/dev/null || fail "the sweep ended before SIG$sig"
  wait $pid 2>/dev/null || true
  [ "$(cat result.csv)" = precious ] || fail "SIG$sig mid-way changed result.csv"
  if [ $sig = TERM ]; then no_temps "SIGTERM"; fi
  rm -f result.csv.tmp-*
done

# model and study files are not written over without --write-over
cp m.kinloop keep.kinloop
printf '# a study\nkinloop-study 1\n' >keep.study
expect_status 5 "$KINLOOP" sweep m.kinloop --steps 4 -o keep.kinloop
expect_text err.txt "'keep.kinloop' is a model file"
expect_text err.txt "--write-over"
cmp -s m.kinloop keep.kinloop || fail "sweep wrote over a model file"
expect_status 5 "$KINLOOP" check m.kinloop -o keep.study
expect_text err.txt "'keep.study' is a study file"
expect_text keep.study "kinloop-study 1"
expect_status 5 "$KINLOOP" draw m.kinloop -o keep.kinloop
expect_status 5 "$KINLOOP" solve m.kinloop -o keep.kinloop
cmp -s m.kinloop keep.kinloop || fail "a command wrote over a model file"
expect_status 0 "$KINLOOP" sweep m.kinloop --steps 4 -o keep.kinloop --write-over
expect_text keep.kinloop "motor (deg)"
# writing a model over a model is a write-over too
expect_status 5 "$KINLOOP" write m.kinloop -o m.kinloop
expect_status 0 "$KINLOOP" write m.kinloop -o m.kinloop --write-over
expect_text m.kinloop "kinloop-model 1"
# the forgotten model file of the issue: a usage error, nothing written
cp "$MODEL" my.kinloop
expect_status 2 "$KINLOOP" sweep --steps 4 -o my.kinloop
expect_text err.txt "needs a model file"
cmp -s "$MODEL" my.kinloop || fail "sweep without a model changed my.kinloop"
finish
