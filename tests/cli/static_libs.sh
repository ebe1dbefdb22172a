#!/bin/sh
# Where every static archive the Makefile asks for is installed, the program
# maps no shared library but the C runtime's (libc, libm, libgcc_s), so that
# a start costs little; without them it is linked against the shared
# libraries, and this check is skipped.
command -v ldd > /dev/null || { echo "ldd not found"; exit 77; }
extra=$(ldd "$HONE" | awk '{print $1}' | grep -v -E '^(linux-vdso\.so|libc\.so|libm\.so|libgcc_s\.so|/lib64/ld-linux)')
[ -z "$extra" ] && exit 0
cc=${CC:-cc}
for l in gsl gslcblas lapacke lapack blas fftw3 readline tinfo crypto csv gfortran quadmath; do
  case $($cc -print-file-name=lib$l.a) in
    /*) ;;
    *) echo "lib$l.a not installed: hone uses the shared libraries"; exit 77 ;;
  esac
done
echo "every archive is installed, yet hone maps: $extra"
exit 1
