#!/bin/sh
# cli_study_interrupt: a study stopped by SIGTERM or SIGINT part-way ends
# with 128 + the signal's number, after printing the summary of the samples
# done marked as partial and writing a complete CSV of exactly those
# samples (a header, one whole row each).
# usage: study_interrupt.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

small_study "$MODEL"
# long enough (minutes) that the signal always comes part-way
sed 's/^samples 250$/samples 1000000/' small.study >long.study

for signal in TERM INT; do
  rm -f samples.csv
  # a background job of a non-interactive shell ignores SIGINT unless it
  # is reset: start the tool with default handling of both
  ( trap - INT TERM; exec "$KINLOOP" study long.study --threads 1 \
      --csv samples.csv >out.txt 2>err.txt ) &
  pid=$!
  sleep 2
  kill -s "$signal" "$pid"
  status=0
  wait "$pid" || status=$?
  if [ "$signal" = TERM ]; then want=143; else want=130; fi
  [ "$status" -eq "$want" ] ||
    fail "SIG$signal: exit status $status, expected $want"
  expect_text out.txt "PARTIAL STUDY: stopped by"
  done=$(sed -n 's/.*after \([0-9]*\) of 1000000 samples.*/\1/p' out.txt)
  [ -n "$done" ] && [ "$done" -gt 0 ] && [ "$done" -lt 1000000 ] ||
    fail "SIG$signal: no count of the samples done"
  expect_text out.txt "samples        $done"
  [ "$(wc -l <samples.csv)" -eq $((done + 1)) ] ||
    fail "SIG$signal: the CSV does not hold exactly the $done samples done"
  last=$(tail -n 1 samples.csv)
  [ "${last%%,*}" -eq $((done - 1)) ] ||
    fail "SIG$signal: the CSV's last row is not sample $((done - 1))"
  [ "$(tail -c 1 samples.csv | od -An -c | tr -d ' ')" = '\n' ] ||
    fail "SIG$signal: the CSV's last row is cut"
done
finish
