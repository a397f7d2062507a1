#!/usr/bin/env bash
# Installs what kinloop needs to build and test, from Debian's packages.
set -euo pipefail
packages=(
  build-essential cmake pkgconf      # compiler and build
  liblapacke-dev                     # LAPACK through LAPACKE: the library's one dependency
  check libgsl-dev valgrind          # tests: Check suites, GSL reference solver, memcheck
  clang libclang-rt-14-dev           # fuzzing with libFuzzer
  python3-numpy python3-scipy python3-sympy python3-pytest  # Python bindings and their tests
  octave liboctave-dev               # Octave bindings (mkoctfile) and their tests
  libxml2-utils librsvg2-bin         # checking the SVG pictures (xmllint, rsvg-convert)
  libopenmpi-dev openmpi-bin         # kinloop-study-mpi and its tests
  lcov                               # line coverage of lib/
  doxygen                            # the API reference
)
sudo=""
if [ "$(id -u)" -ne 0 ]; then sudo=sudo; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -qq
$sudo apt-get install -y -qq --no-install-recommends "${packages[@]}" >/dev/null
echo "install-deps: ${#packages[@]} packages in place"
