#!/bin/sh
# mpi_study_*: kinloop-study-mpi prints the summary that `kinloop study`
# prints, byte for byte but for the throughput line, however the samples
# are shared out: mode "cli" compares two MPI ranks with the tool on one
# and on two threads; mode "ranks" compares one rank, two ranks, and two
# ranks of two threads each.
# usage: same_summary.sh cli|ranks TOOL STUDY_MPI MPIRUN STUDY
set -eu
MODE=$1
KINLOOP=$2
STUDY_MPI=$3
MPIRUN=$4
STUDY=$5
. "$(dirname "$0")/../../cli/tests/lib.sh"

# ranks P [OPTIONS]: the MPI driver on P processes
ranks() {
  p=$1
  shift
  "$MPIRUN" --oversubscribe --allow-run-as-root -np "$p" "$STUDY_MPI" \
    "$STUDY" "$@"
}

# summary NAME COMMAND...: runs COMMAND (exit 0 expected) and keeps its
# output but for the throughput line in NAME.txt, which it checks names
# the processes and threads as WANT says (the variable).
summary() {
  name=$1
  shift
  expect_status 0 "$@"
  [ "$(grep -c '^throughput' out.txt)" -eq 1 ] ||
    fail "$name: not exactly one throughput line"
  expect_text out.txt "$WANT)"
  grep -v '^throughput' out.txt >"$name.txt"
}

# same A B: the two summaries are identical, and are a summary
same() {
  cmp -s "$1.txt" "$2.txt" || {
    fail "$1 and $2 differ:"
    diff "$1.txt" "$2.txt" >&2 || true
  }
}

if [ "$MODE" = cli ]; then
  WANT="1 process x 1 thread" summary threads1 "$KINLOOP" study "$STUDY" \
    --threads 1
  WANT="1 process x 2 threads" summary threads2 "$KINLOOP" study "$STUDY" \
    --threads 2
  WANT="2 processes x 1 thread" summary ranks2 ranks 2
  same threads1 threads2
  same threads1 ranks2
  first=threads1
else
  WANT="1 process x 1 thread" summary ranks1 ranks 1
  WANT="2 processes x 1 thread" summary ranks2 ranks 2
  WANT="2 processes x 2 threads" summary ranks2x2 ranks 2 --threads 2
  same ranks1 ranks2
  same ranks1 ranks2x2
  first=ranks1
fi
# what was compared is a whole summary of the 300 samples and 4 outputs
for text in "samples        300" "output stroke: limits 212.2 to 215.2" \
  "output mu_min" "output tip_low" "output torque: no limits" \
  "not assembled  0 of 300"; do
  expect_text "$first.txt" "$text"
done
finish
