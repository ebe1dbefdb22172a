#!/bin/sh
# Install the Debian packages that hone's build and tests need (run as root).
set -e
PKGS="build-essential pkg-config libgsl-dev liblapacke-dev libreadline-dev libcsv-dev
      libssl-dev libcairo2-dev libcmocka-dev libfftw3-dev clang libclang-rt-14-dev python3-numpy python3-scipy chromium poppler-utils
      parallel tmux valgrind"
missing=""
for p in $PKGS; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
if [ -n "$missing" ]; then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends $missing
fi
# The program links LAPACK's static archive, which needs the Fortran
# runtime's archive of the installed gcc (the Makefile falls back to the
# shared libraries without it).
fortran="libgfortran-$(gcc -dumpversion | cut -d. -f1)-dev"
if ! dpkg-query -W -f='${Status}' "$fortran" 2>/dev/null | grep -q "install ok installed"; then
  export DEBIAN_FRONTEND=noninteractive
  [ -n "$missing" ] || apt-get update -qq
  apt-get install -y -qq --no-install-recommends "$fortran"
fi
