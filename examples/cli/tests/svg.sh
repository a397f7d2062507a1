#!/bin/sh
# cli_svg: every SVG the tool writes is well-formed XML (xmllint, from
# Debian's libxml2-utils) and renders to a non-empty PNG (rsvg-convert,
# from Debian's librsvg2-bin): the demo's files, drawings and plots of the
# demo with every option, of a model with awkward names, and of a motion
# that stops at a limit.
# usage: svg.sh TOOL DEMO_MODEL
set -eu
KINLOOP=$1
DEMO=$2
. "$(dirname "$0")/lib.sh"

expect_status 0 "$KINLOOP"
expect_status 0 "$KINLOOP" draw "$DEMO" -o draw-default.svg
# the drawing's coordinate axes, with the model's length unit
expect_text draw-default.svg 'class="axes"'
expect_text draw-default.svg 'x (mm)</text>'
expect_text draw-default.svg 'y (mm)</text>'
expect_status 0 "$KINLOOP" draw "$DEMO" --pose 10 --pose 100 --pose 250 -o draw-at.svg
expect_status 0 "$KINLOOP" draw "$DEMO" --poses 1 --no-paths -o draw-bare.svg
expect_status 0 "$KINLOOP" draw "$DEMO" --from 30 --to 120 --steps 9 -o draw-part.svg
expect_status 0 "$KINLOOP" plot "$DEMO" --show angle:coupler --show angle:rocker \
  -o plot-two.svg
expect_status 0 "$KINLOOP" plot "$DEMO" --show "y:tucker tip" --order 2 -o plot-acc.svg
expect_status 0 "$KINLOOP" plot "$DEMO" --show transmission:rocker_pin --from 90 \
  --to -90 -o plot-backwards.svg

# names that need escaping in XML, and UTF-8 (geometry chosen for this
# test: a crank-rocker, ground 100, crank 30, coupler 90, rocker 70)
cat >names.kinloop <<'MODEL'
kinloop-model 1
units length unstated angle rad
link "crank <1>"
link "coupler & co"
link "rocker \"r\""
revolute "m'1" ground 0 0 "crank <1>" 0 0
revolute "a&b" "crank <1>" 30 0 "coupler & co" 0 0
revolute "<c>" "coupler & co" 90 0 "rocker \"r\"" 70 0
revolute pivot "rocker \"r\"" 0 0 ground 100 0
point "tip é" "coupler & co" 45 20
input "m'1"
sketch angle "coupler & co" 0.6
sketch angle "rocker \"r\"" 1.6
MODEL
expect_status 0 "$KINLOOP" draw names.kinloop -o names-draw.svg
expect_status 0 "$KINLOOP" plot names.kinloop --show "angle:rocker \"r\"" \
  --show "transmission:<c>" -o names-plot.svg

# a double-rocker swept past its toggle position (geometry chosen for
# this test): the drawing and the plot end where the motion stops
fourbar_model stops.kinloop 80 30 90 0 100 60 120 30
expect_status 0 "$KINLOOP" draw stops.kinloop -o stops-draw.svg
expect_text err.txt "toggle or limit position"
expect_status 0 "$KINLOOP" plot stops.kinloop --show angle:rocker \
  -o stops-plot.svg
expect_text stops-plot.svg "motion stops"

check_svgs 16 kinloop-demo/*.svg *.svg
finish
