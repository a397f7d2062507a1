#!/bin/sh
# cli_roundtrip: `kinloop write` gives the model in canonical text; writing
# what it wrote gives the same text again, and the rewritten model sweeps
# to the same numbers (angles in degrees within a rounding of the
# conversion, as docs/model-format.md says).
# usage: roundtrip.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP" write "$MODEL" -o demo.kinloop
expect_status 0 "$KINLOOP" write "$MODEL" -o from-file.kinloop
cmp -s demo.kinloop from-file.kinloop ||
  fail "the demo and $MODEL write differently"
expect_status 0 "$KINLOOP" write demo.kinloop -o again.kinloop
cmp -s demo.kinloop again.kinloop || fail "writing the written model changed it"
expect_status 0 "$KINLOOP" write demo.kinloop
cmp -s demo.kinloop out.txt || fail "write to standard output differs"
expect_text demo.kinloop "kinloop-model 1"

expect_status 0 "$KINLOOP" sweep "$MODEL" --all-digits -o original.csv
expect_status 0 "$KINLOOP" sweep demo.kinloop --all-digits -o rewritten.csv
# same header, and every number within 1e-9 of the larger of 1 and itself
head -1 original.csv >header1.txt
head -1 rewritten.csv >header2.txt
cmp -s header1.txt header2.txt || fail "the headers differ"
paste -d, original.csv rewritten.csv | awk -F, '
  NR > 1 {
    n = NF / 2
    for (i = 1; i <= n; i++) {
      a = $i + 0; b = $(i + n) + 0
      d = a - b; if (d < 0) d = -d
      m = a < 0 ? -a : a; if (m < 1) m = 1
      if (d > 1e-9 * m) { printf "row %d column %d: %s vs %s\n", NR, i, $i, $(i + n); bad = 1 }
    }
  }
  END { exit bad }' >diff.txt || { fail "the sweeps differ:"; head -5 diff.txt >&2; }
finish
