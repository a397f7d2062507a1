#!/bin/sh
# cli_tutorial: docs/tutorial-cli.md works as written. Its model file and
# every command of its sh blocks are run in order; the reports show what the
# tutorial says (and what the law of cosines says of the transmission
# angle), the table agrees with the library (check_csv) and closes the
# four-bar's loop, and the drawings stand where the library solves them.
# usage: tutorial.sh TOOL CHECK_JOINTS CHECK_CSV TUTORIAL_MD
set -eu
KINLOOP=$1
JOINTS=$2
CSV=$3
DOC=$4
. "$(dirname "$0")/lib.sh"

# the first text block holding a model is the file the tutorial saves
awk '/^```text$/ { inside = 1; text = ""; next }
     /^```$/ && inside { if (text ~ /kinloop-model/) { printf "%s", text; exit }
                         inside = 0; next }
     inside { text = text $0 "\n" }' "$DOC" >inker.kinloop
expect_text inker.kinloop "kinloop-model 1"

awk '/^```sh$/ { inside = 1; next } /^```$/ { inside = 0 } inside' "$DOC" \
  >commands.txt
[ "$(grep -c '^kinloop ' commands.txt)" -ge 8 ] ||
  fail "the tutorial's commands were not found"
kinloop() { "$KINLOOP" "$@"; }
n=0
while IFS= read -r line; do
  n=$((n + 1))
  set +e
  eval "$line" >"step$n.txt" 2>"step$n.err"
  status=$?
  set -e
  [ "$status" -eq 0 ] || {
    fail "tutorial command '$line' exited with $status:"
    cat "step$n.err" >&2
  }
  case $line in
  "kinloop check"*) checks="${checks:-} step$n.txt" ;;
  esac
done <commands.txt

set -- $checks
[ $# -eq 2 ] || fail "expected two check commands in the tutorial, found $#"
expect_text "$1" "crank-rocker (ground 120, input 50, coupler 110, output 80 mm)"
expect_text "$1" "transmission angle 39.4 to 126.2 deg"
expect_text "$1" "the transmission angle at wrist falls to 39.4 deg"
expect_text "$2" "warnings: none"
# The transmission angle's extremes by the law of cosines (figures.md,
# section 4), with crank and ground in line: coupler b = 110, arm c = 80,
# ground d = 120, crank a = 40.
want=$(awk 'BEGIN { b = 110; c = 80; d = 120; a = 40; pi = atan2(0, -1)
  lo = (b*b + c*c - (d-a)^2) / (2*b*c); hi = (b*b + c*c - (d+a)^2) / (2*b*c)
  printf "transmission angle %.4g to %.4g deg", atan2(sqrt(1-lo*lo), lo)*180/pi,
         atan2(sqrt(1-hi*hi), hi)*180/pi }')
expect_text "$2" "$want"

# the table and the drawings, against the library
expect_status 0 "$CSV" inker.kinloop inker.csv 72 180 6 wrist:elbow:pivot
expect_status 0 "$JOINTS" inker.kinloop inker.svg 4
expect_status 0 "$JOINTS" inker.kinloop two.svg 2
[ "$(wc -l <quarter.csv)" -eq 5 ] || fail "quarter.csv should have 5 lines"
for f in inker.svg two.svg wrist.svg arm-ratio.svg; do
  xmllint --noout "$f" || fail "$f is not well-formed"
done

# Every row closes the four-bar's loop (theory.md, section 7):
# a cos t2 + b cos t3 = d + c cos t4 and a sin t2 + b sin t3 = c sin t4,
# and the pad, 130 mm out on the arm, moves at 130 times the arm's rate.
expect_status 0 "$KINLOOP" sweep inker.kinloop --all-digits --speed 180 \
  -o exact.csv
awk -F, 'NR > 1 {
    pi = atan2(0, -1); k = pi / 180
    t2 = $2 * k; t3 = $5 * k; t4 = $8 * k; w4 = $9 * k
    ex = 40*cos(t2) + 110*cos(t3) - 120 - 80*cos(t4)
    ey = 40*sin(t2) + 110*sin(t3) - 80*sin(t4)
    px = 120 + 130*cos(t4) - $11; py = 130*sin(t4) - $12
    vx = -130*sin(t4)*w4 - $13; vy = 130*cos(t4)*w4 - $14
    e = sqrt(ex*ex + ey*ey) + sqrt(px*px + py*py)
    v = sqrt(vx*vx + vy*vy)
    if (e > 1e-9 || v > 1e-9) { printf "row %d: loop %g, pad speed %g\n", NR, e, v; bad = 1 }
  }
  END { exit bad }' exact.csv >closure.txt ||
  { fail "the sweep does not close the loop:"; head -3 closure.txt >&2; }
finish
