#!/usr/bin/env bash
# Installs kinloop from a build tree into a scratch prefix and builds a
# consumer against it three ways: pkg-config with the shared library,
# pkg-config --static with the static library, and CMake's find_package.
# With the bindings built (second argument ON), it then solves a four-bar
# from a scratch directory in /usr/bin/python3 and in octave-cli with only
# the prefix's paths set, as the bindings' READMEs say: PYTHONPATH=<prefix>/
# lib/python3/dist-packages, Octave's addpath(<prefix>/share/kinloop/octave).
set -euo pipefail
build_dir=$(cd "$1" && pwd)
bindings=${2:-OFF}
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

if [ "$bindings" != "ON" ]; then
  exit 0
fi

# ---- the bindings, installed: nothing of the source or build tree used ----
site=$prefix/lib/python3/dist-packages
octave_dir=$prefix/share/kinloop/octave
test -f "$site/kinloop/__init__.py" && test -f "$site/kinloop/_api.py"
test -d "$octave_dir/+kinloop" && test -f "$octave_dir/PKG_ADD"
# the installed files find the library from where they are, never from
# the build tree (the oct-file's rpath, the package's recorded path)
oct=$(find "$prefix" -name __kinloop__.oct)
test "$(wc -l <<<"$oct")" = 1
runpath=$(readelf -d "$oct" | grep -E 'RPATH|RUNPATH')
if ! grep -q 'ORIGIN' <<<"$runpath" || grep -q "$build_dir" <<<"$runpath"; then
  echo "the installed oct-file's rpath is not relative: $runpath" >&2
  exit 1
fi
if grep -rq "$build_dir" "$site/kinloop"; then
  echo "the installed Python package names the build tree" >&2
  exit 1
fi
if find "$prefix" -path '*test*' -name '*.oct' | grep -q .; then
  echo "the test gateway was installed" >&2
  exit 1
fi

scratch=$work/scratch
mkdir "$scratch"
# a four-bar (the README's: crank 40, coupler 120, rocker 80, ground 100,
# the open branch); its rocker swings 73.78 degrees by the law of cosines,
# as docs/tutorials/fourbar.md derives
cat >"$scratch/fourbar.py" <<'PY'
import math
import kinloop as kl
with kl.Model() as m:
    crank, coupler, rocker = m.add_link("crank"), m.add_link("coupler"), m.add_link("rocker")
    motor = m.add_revolute(kl.GROUND, (0, 0), crank, (0, 0))
    m.add_revolute(crank, (40, 0), coupler, (0, 0))
    m.add_revolute(coupler, (120, 0), rocker, (80, 0))
    m.add_revolute(rocker, (0, 0), kl.GROUND, (100, 0))
    m.add_input(motor)
    m.finalize()
    s = kl.Solver(m)
    s.set_link_angle(coupler, 0.3)
    s.set_link_angle(rocker, 1.5)
    turn = s.sweep(0, 0.0, 2 * math.pi, 360)
    swing = math.degrees(turn.link_angle[:, rocker].max() - turn.link_angle[:, rocker].min())
    print("python: kinloop %s from %s, rocker swings %.2f degrees" % (
        kl.version(), kl.library_path, swing))
    assert abs(swing - 73.78) < 0.05
PY
cat >"$scratch/fourbar.m" <<'OCTAVE'
m = kinloop.Model();
crank = m.add_link('crank'); coupler = m.add_link('coupler'); rocker = m.add_link('rocker');
motor = m.add_revolute(0, [0 0], crank, [0 0]);
m.add_revolute(crank, [40 0], coupler, [0 0]);
m.add_revolute(coupler, [120 0], rocker, [80 0]);
m.add_revolute(rocker, [0 0], 0, [100 0]);
m.add_input(motor);
m.finalize();
s = kinloop.Solver(m);
s.set_link_angle(coupler, 0.3);
s.set_link_angle(rocker, 1.5);
r = s.sweep(0, 0, 2 * pi, 360);
a = r.link_angle(:, rocker + 1);
swing = (max(a) - min(a)) * 180 / pi;
printf('octave: kinloop %s from %s, rocker swings %.2f degrees\n', kinloop.version(), ...
       which('__kinloop__'), swing);
assert(abs(swing - 73.78) < 0.05);
clear s m
OCTAVE
# only the prefix's paths: a clean environment, run from the scratch directory
clean=(env -i PATH=/usr/bin:/bin HOME="$scratch" LANG=C.UTF-8)
said=$(cd "$scratch" && "${clean[@]}" PYTHONPATH="$site" /usr/bin/python3 -B fourbar.py)
said+=$'\n'$(cd "$scratch" && "${clean[@]}" octave-cli --no-gui --norc --quiet --no-history \
  --eval "addpath('$octave_dir'); fourbar")
echo "$said"
# each loaded what the prefix holds
if [ "$(grep -c "from $prefix/" <<<"$said")" != 2 ]; then
  echo "a binding did not load the installed library or oct-file" >&2
  exit 1
fi
echo "install check: the Python package and the Octave package work from the prefix"
