# lib.sh - what the kinloop tool's shell tests share: a scratch folder that
# is removed afterwards, failure counting, exit-status checks, four-bar
# model files and the check of SVG pictures.
# Source it after setting KINLOOP to the tool's path.

failures=0
scratch=$(mktemp -d "${TMPDIR:-/tmp}/kinloop-cli-test.XXXXXX")
trap 'rm -rf "$scratch"' EXIT
cd "$scratch"

fail() {
  echo "FAIL: $*" >&2
  failures=$((failures + 1))
}

# expect_status CODE COMMAND...: runs COMMAND, output into out.txt and
# err.txt, and checks its exit status.
expect_status() {
  want=$1
  shift
  set +e
  "$@" >out.txt 2>err.txt
  got=$?
  set -e
  if [ "$got" -ne "$want" ]; then
    fail "'$*' exited with $got, expected $want; its messages:"
    sed 's/^/    /' err.txt >&2
  fi
}

# expect_text FILE TEXT: FILE must contain the fixed string TEXT.
expect_text() {
  grep -qF -- "$2" "$1" || fail "$1 lacks '$2'"
}

# fourbar_model FILE CRANK COUPLER ROCKER COUPLER_DEG ROCKER_DEG FROM TO STEPS:
# writes a four-bar model file, ground 100 mm from (0, 0) to (100, 0), the
# crank driven at the origin (input joint motor; pins crank_pin, rocker_pin,
# pivot), sketched at the two angles, swept from FROM to TO degrees.
fourbar_model() {
  cat >"$1" <<MODEL
kinloop-model 1
units length mm angle deg
link crank
link coupler
link rocker
revolute motor ground 0 0 crank 0 0
revolute crank_pin crank $2 0 coupler 0 0
revolute rocker_pin coupler $3 0 rocker $4 0
revolute pivot rocker 0 0 ground 100 0
input motor
sketch angle coupler $5
sketch angle rocker $6
sweep motor from $7 to $8 steps $9
MODEL
}

# check_svgs COUNT FILE...: every FILE is well-formed XML that rsvg-convert
# renders to a PNG, and there are COUNT of them.
check_svgs() {
  want=$1
  shift
  count=0
  for f in "$@"; do
    count=$((count + 1))
    xmllint --noout "$f" 2>xml.txt || {
      fail "$f is not well-formed XML:"
      cat xml.txt >&2
      continue
    }
    rsvg-convert "$f" -o picture.png 2>render.txt || {
      fail "$f does not render:"
      cat render.txt >&2
      continue
    }
    # a PNG starts with the bytes 0x89 'P' 'N' 'G'
    [ -s picture.png ] && [ "$(head -c 4 picture.png | tail -c 3)" = PNG ] ||
      fail "$f rendered to an empty or broken PNG"
  done
  [ "$count" -eq "$want" ] || fail "$count SVG files checked, expected $want"
}

finish() {
  if [ "$failures" -ne 0 ]; then
    echo "$failures check(s) failed" >&2
    exit 1
  fi
  echo "all checks passed"
}

# expect_all_digits FULL PLAIN: FULL, written with --all-digits, has the
# same header and shape as PLAIN (written with 9 significant digits), every
# number of it prints as PLAIN's when rounded to 9 digits, and some number
# carries more than 9 (so the option reached the writer).
expect_all_digits() {
  awk -F, 'NR == FNR { plain[FNR] = $0; next }
    FNR == 1 { if ($0 != plain[1]) { print "headers differ"; bad = 1 }; next }
    { n = split(plain[FNR], p, ",")
      if (n != NF) { print "row " FNR ": " NF " fields, " n " plain"; bad = 1 }
      for (i = 1; i <= NF; i++) {
        if ($i != p[i] && sprintf("%.9g", $i + 0) != p[i]) {
          print "row " FNR " field " i ": " $i " is not " p[i]; bad = 1 }
        d = $i; sub(/^-/, "", d); sub(/[eE].*/, "", d); gsub(/[.]/, "", d)
        sub(/^0+/, "", d)
        if (length(d) > 9) longer = 1
      } }
    END { if (!longer) print "no number has more than 9 digits"
          exit bad || !longer }' "$2" "$1" ||
    fail "$1 is not $2 with every digit"
}
