#!/usr/bin/env bash
# Installs what kinloop needs to build and test, from Debian's packages.
set -euo pipefail
packages=(
  build-essential cmake pkgconf      # compiler and build
  liblapacke-dev                     # LAPACK through LAPACKE: the library's one dependency
  check libgsl-dev valgrind          # tests: Check suites, GSL reference solver, memcheck
)
sudo=""
if [ "$(id -u)" -ne 0 ]; then sudo=sudo; fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -qq
$sudo apt-get install -y -qq --no-install-recommends "${packages[@]}" >/dev/null
echo "install-deps: ${#packages[@]} packages in place"
