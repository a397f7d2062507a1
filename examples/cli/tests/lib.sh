# lib.sh - what the kinloop tool's shell tests share: a scratch folder that
# is removed afterwards, failure counting, and exit-status checks.
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

finish() {
  if [ "$failures" -ne 0 ]; then
    echo "$failures check(s) failed" >&2
    exit 1
  fi
  echo "all checks passed"
}
