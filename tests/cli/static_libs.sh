#!/bin/sh
# Where every static archive the Makefile asks for is installed, the program
# maps no shared library but the C runtime's (libc, libm, libgcc_s), so that
# a start costs little; without them it is linked against the shared
# libraries, and this check is skipped (so it is in the sanitizer builds).
command -v ldd > /dev/null || { echo "ldd not found"; exit 77; }
libs=$(ldd "$HONE" | awk '{print $1}')
case $libs in
  *libasan*|*libubsan*|*libtsan*) echo "a sanitizer build: linked against the shared libraries"; exit 77 ;;
esac
extra=$(printf '%s\n' "$libs" | grep -v -E '^(linux-vdso\.so|libc\.so|libm\.so|libgcc_s\.so|/lib64/ld-linux)')
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
