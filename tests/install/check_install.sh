#!/usr/bin/env bash
# Installs kinloop from a build tree into a scratch prefix and builds a
# consumer against it three ways: pkg-config with the shared library,
# pkg-config --static with the static library, and CMake's find_package.
set -euo pipefail
build_dir=$1
source_dir=$(cd "$(dirname "$0")" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
prefix=$work/prefix
cmake --install "$build_dir" --prefix "$prefix" >/dev/null
libdir=$(dirname "$(find "$prefix" -name kinloop.pc)")
libdir=$(dirname "$libdir")
export PKG_CONFIG_PATH=$libdir/pkgconfig

test -f "$prefix/include/kinloop.h"
test -f "$libdir/libkinloop.a"
ls "$libdir"/libkinloop.so.* >/dev/null

# shared, through pkg-config
cc -std=c99 -o "$work/shared" "$source_dir/consumer.c" \
  $(pkg-config --cflags --libs kinloop) -lm -Wl,-rpath,"$libdir"
"$work/shared"
# (ldd's output is captured first: grep -q closing the pipe early would fail
# the pipeline under pipefail)
deps=$(ldd "$work/shared")
if ! grep -q libkinloop.so <<<"$deps"; then
  echo "shared consumer does not load libkinloop.so" >&2
  exit 1
fi

# static: the archive plus what pkg-config --static says it needs
cc -std=c99 -o "$work/static" "$source_dir/consumer.c" \
  $(pkg-config --cflags kinloop) "$libdir/libkinloop.a" \
  $(pkg-config --static --libs-only-L --libs-only-other kinloop) \
  $(pkg-config --static --libs-only-l kinloop | sed 's/-lkinloop//') -lm
"$work/static"
deps=$(ldd "$work/static")
if grep -q libkinloop <<<"$deps"; then
  echo "static consumer still loads libkinloop" >&2
  exit 1
fi

# CMake package: kinloop::kinloop and kinloop::kinloop_static
cmake -S "$source_dir" -B "$work/cmake" -DCMAKE_PREFIX_PATH="$prefix" >/dev/null
cmake --build "$work/cmake" >/dev/null
LD_LIBRARY_PATH=$libdir "$work/cmake/consumer_shared"
"$work/cmake/consumer_static"
echo "install check: pkg-config (shared, static) and find_package all work"
