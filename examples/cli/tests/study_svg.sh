#!/bin/sh
# cli_study_svg: `kinloop study --charts DIR` writes a histogram of every
# output and scatter plots against the two dimensions that correlate with
# it most (none for an output that does not vary), each well-formed XML
# (xmllint) that renders to a PNG (rsvg-convert); samples without a value
# (they do not assemble) are drawn as such.
# usage: study_svg.sh TOOL MODEL_FILE
set -eu
KINLOOP=$1
MODEL=$2
. "$(dirname "$0")/lib.sh"
. "$(dirname "$0")/study_lib.sh"

small_study "$MODEL"
expect_status 0 "$KINLOOP" study small.study --charts charts
# 4 outputs; reach is the sweep's end in every sample: no scatter plots
expect_text out.txt "charts written in charts/: 4 histograms, 6 scatter plots"
for f in out1-stroke-histogram.svg out2-mu_min-histogram.svg \
  out3-tip_low-histogram.svg out4-reach-histogram.svg; do
  [ -s "charts/$f" ] || fail "charts/$f missing or empty"
done
[ "$(ls charts | grep -c -- '-vs-dim')" -eq 6 ] || fail "not 6 scatter plots"
expect_text charts/out1-stroke-histogram.svg "upper limit 214.2"
# a second run into the same folder replaces the files
expect_status 0 "$KINLOOP" study small.study --charts charts

# a study where a quarter of the samples do not assemble (geometry chosen
# for this test: a crank-rocker, ground 100, crank 40, coupler 120, rocker
# 80, its coupler drawn from 80 to 160)
fourbar_model fourbar.kinloop 40 120 80 36 63 0 360 72
cat >loose.study <<'STUDY'
kinloop-study 1
model fourbar.kinloop
samples 200
vary joint rocker_pin a x tolerance 40 uniform
vary joint rocker_pin b x tolerance 2 uniform
output swing swing angle rocker
limit swing 0 60
STUDY
expect_status 0 "$KINLOOP" study loose.study --charts loose
expect_text out.txt "charts written in loose/: 1 histogram, 2 scatter plots"
expect_text loose/out1-swing-histogram.svg "the others have no value"
for f in loose/*-vs-*.svg; do
  expect_text "$f" "samples without a value"
done

check_svgs 13 charts/*.svg loose/*.svg
finish
