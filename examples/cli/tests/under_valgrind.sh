#!/bin/sh
# under_valgrind.sh - runs the tool named by $KINLOOP_TOOL under valgrind
# memcheck with the given arguments, for the *_memcheck tests: errors and
# leaks exit with 97, a status the test scripts never expect.
exec "${VALGRIND:-valgrind}" --quiet --error-exitcode=97 --leak-check=full \
  --errors-for-leak-kinds=definite,indirect,possible \
  --show-leak-kinds=definite,indirect,possible "$KINLOOP_TOOL" "$@"
