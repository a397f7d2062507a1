#!/bin/sh
# cli_study_no_assembly: a study whose tolerances are so wide that some
# samples cannot be put together and others cannot turn through the whole
# sweep reports both in its outline and in every output's block, as its
# CSV has them, and exactly for the samples the geometry says (check_study
# assembly: the triangle inequality at the start, Grashof's condition for
# the full turn); the summary of the others still holds (check_study
# summary).
# usage: study_no_assembly.sh TOOL CHECK_STUDY
set -eu
KINLOOP=$1
CHECK=$2
. "$(dirname "$0")/lib.sh"

# Geometry chosen for this test: a crank-rocker four-bar, ground 100,
# crank 40, coupler 90, rocker 80, swept through a full turn from crank
# 0 deg, where the crank pin stands 100 - 40 = 60 from the rocker's pivot.
# The coupler c is drawn evenly from 20 to 160: the dyad closes there when
# |c - 80| <= 60 <= c + 80 (c <= 140), and the crank turns fully when
# 40 + max(100, c) < c + 80 + 100 - max(100, c), that is 60 < c < 140; so
# about 14% do not assemble and 29% stop at a limit position.
fourbar_model fourbar.kinloop 40 90 80 61 101 0 360 72
cat >loose.study <<'STUDY'
kinloop-study 1
model fourbar.kinloop
seed 11
samples 300
vary joint rocker_pin a x tolerance 70 uniform
output swing swing angle rocker
output mu_min min transmission rocker_pin crank_pin pivot
limit mu_min 30 150
STUDY
expect_status 0 "$KINLOOP" study loose.study --csv loose.csv -o table.txt
# count_status WORD: the samples of that status in the CSV
count_status() {
  grep -c ",$1," loose.csv || true
}
failed=$(count_status "no assembly")
stopped=$(count_status stopped)
[ "$failed" -gt 20 ] || fail "only $failed of 300 samples failed to assemble"
[ "$stopped" -gt 40 ] || fail "only $stopped of 300 samples stopped short"
# the outline and both outputs say so, as counts and percentages
for pair in "not assembled:$failed" "motion stopped:$stopped"; do
  label=${pair%:*}
  n=${pair#*:}
  percent=$(awk -v f="$n" 'BEGIN { printf "%.2f%%", 100 * f / 300 }')
  [ "$(grep -c "^  $label *$n of 300 *$percent\$" table.txt)" -eq 3 ] ||
    fail "the table does not report '$label' $n of 300 ($percent) three times"
done
expect_status 0 "$CHECK" assembly loose.csv "rocker_pin a x (mm)" 100 40 80 0.5
cat out.txt err.txt >&2
# the others' summary holds; samples that stopped count as outside the
# limits
expect_status 0 "$CHECK" summary loose.study table.txt loose.csv
cat out.txt err.txt >&2
finish
