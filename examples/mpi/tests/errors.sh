#!/bin/sh
# mpi_study_errors: kinloop-study-mpi exits as `kinloop study` does: 2 for
# a usage error, 3 for a study that cannot be read (with line and column
# when it is not in the format), each said once, by rank 0.
# usage: errors.sh STUDY_MPI MPIRUN
set -eu
STUDY_MPI=$1
MPIRUN=$2
. "$(dirname "$0")/../../cli/tests/lib.sh"

run2() {
  "$MPIRUN" --oversubscribe --allow-run-as-root -np 2 "$STUDY_MPI" "$@"
}

expect_status 0 run2 --help
expect_text out.txt "usage: mpirun"
[ "$(grep -c '^usage:' out.txt)" -eq 1 ] || fail "--help printed more than once"
expect_status 2 run2
expect_text err.txt "which study?"
expect_status 2 run2 a.study --threads many
expect_text err.txt "--threads wants a whole number"
expect_status 3 run2 no-such.study
expect_text err.txt "cannot open 'no-such.study'"
[ "$(grep -c "cannot open 'no-such.study'" err.txt)" -eq 1 ] ||
  fail "the message of a missing study came more than once"
printf 'kinloop-study 1\nsamples many\n' >bad.study
expect_status 3 run2 bad.study
# 'many' is the 9th character of line 2
expect_text err.txt "bad.study:2:9: expected a number"
finish
