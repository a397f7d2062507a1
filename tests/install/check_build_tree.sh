#!/usr/bin/env bash
# The build tree's kinloop.pc, for users who do not install: with
# PKG_CONFIG_PATH=<build dir> an outside consumer compiles, links (shared,
# and static with pkg-config --static) and runs against the build tree.
set -euo pipefail
build_dir=$(cd "$1" && pwd)
source_dir=$(cd "$(dirname "$0")" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
export PKG_CONFIG_PATH=$build_dir
libdir=$(pkg-config --variable=libdir kinloop)
includedir=$(pkg-config --variable=includedir kinloop)
test -f "$includedir/kinloop.h" || { echo "no kinloop.h in $includedir" >&2; exit 1; }
ls "$libdir"/libkinloop.so.* >/dev/null 2>&1 ||
  { echo "no libkinloop.so in $libdir" >&2; exit 1; }

cd "$work"   # nothing found by accident from the source or build tree
cc -std=c99 -o shared "$source_dir/consumer.c" \
  $(pkg-config --cflags --libs kinloop) -lm -Wl,-rpath,"$libdir"
./shared
deps=$(ldd ./shared)
if ! grep -q "$libdir/libkinloop.so" <<<"$deps"; then
  echo "the consumer does not load the build tree's libkinloop.so" >&2
  exit 1
fi
cc -std=c99 -o static "$source_dir/consumer.c" \
  $(pkg-config --cflags kinloop) "$libdir/libkinloop.a" \
  $(pkg-config --static --libs-only-L --libs-only-other kinloop) \
  $(pkg-config --static --libs-only-l kinloop | sed 's/-lkinloop//') -lm
./static
echo "build tree check: pkg-config (shared, static) from the build tree works"
