#!/usr/bin/env bash
# Build the in-process examples (c/check_from_c.c, fortran/check_from_fortran.f90) against a
# tancheck installed by fortran-shim/install.sh, twice: through CMake (find_package) and through
# pkg-config; run every program built. Exit 0 when every program ran and said what it should.
#
#   fortran-shim/examples/build-installed.sh PREFIX WORKDIR [--no-fortran]
#
# CC and FC choose the compilers (default cc and gfortran).
set -euo pipefail
if [ $# -lt 2 ]; then
    echo "usage: $0 PREFIX WORKDIR [--no-fortran]" >&2
    exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
prefix=$(cd "$1" && pwd)
mkdir -p "$2"
work=$(cd "$2" && pwd)
fortran=1
[ "${3:-}" = "--no-fortran" ] && fortran=0
cc=${CC:-cc}
fc=${FC:-gfortran}

expect() { # program, the line it must end with
    local out
    out=$("$1")
    echo "$out" | tail -n 1
    if [ "$(echo "$out" | tail -n 1)" != "$2" ]; then
        echo "build-installed: $1 did not end with \`$2\`:" >&2
        echo "$out" >&2
        exit 1
    fi
}

echo "== through CMake (find_package(tancheck))"
fopt=ON
[ "$fortran" = 1 ] || fopt=OFF
cmake -S "$here" -B "$work/cmake" -DCMAKE_PREFIX_PATH="$prefix" -DTANCHECK_EXAMPLES_FORTRAN=$fopt \
    -DCMAKE_C_COMPILER="$cc" ${FC:+-DCMAKE_Fortran_COMPILER="$fc"} >"$work/cmake-configure.log" \
    || { cat "$work/cmake-configure.log"; exit 1; }
cmake --build "$work/cmake" >"$work/cmake-build.log" 2>&1 || { cat "$work/cmake-build.log"; exit 1; }
expect "$work/cmake/check_from_c" "as expected: c_j2 passes, c_j2_continuum fails"
if [ "$fortran" = 1 ]; then
    [ -x "$work/cmake/check_from_fortran" ] || { echo "build-installed: CMake did not build check_from_fortran" >&2; cat "$work/cmake-configure.log"; exit 1; }
    expect "$work/cmake/check_from_fortran" "as expected: f_j2 passes, f_j2_continuum fails"
fi

echo "== through pkg-config"
export PKG_CONFIG_PATH="$prefix/lib/pkgconfig${PKG_CONFIG_PATH:+:$PKG_CONFIG_PATH}"
d="$work/pkg-config"
mkdir -p "$d"
read -r -a cflags <<<"$(pkg-config --cflags tancheck)"
read -r -a libs <<<"$(pkg-config --libs tancheck)"
# shellcheck disable=SC2086 # CC may hold a program and leading arguments
$cc "${cflags[@]}" -c "$here/c/j2.c" -o "$d/j2.o"
# shellcheck disable=SC2086
$cc "${cflags[@]}" -DTC_COMPLEX -c "$here/c/j2.c" -o "$d/j2_cx.o"
# shellcheck disable=SC2086
$cc "${cflags[@]}" "$here/c/check_from_c.c" "$d/j2.o" "$d/j2_cx.o" "${libs[@]}" -lm -o "$d/check_from_c"
expect "$d/check_from_c" "as expected: c_j2 passes, c_j2_continuum fails"
if [ "$fortran" = 1 ]; then
    read -r -a fflags <<<"$(pkg-config --cflags tancheck-fortran)"
    read -r -a flibs <<<"$(pkg-config --libs tancheck-fortran)"
    # shellcheck disable=SC2086 # FC may hold a program and leading arguments
    $fc -cpp "${fflags[@]}" -J "$d" -c "$here/fortran/j2.F90" -o "$d/fj2.o"
    # shellcheck disable=SC2086
    $fc -cpp "${fflags[@]}" -J "$d" -DTC_COMPLEX -c "$here/fortran/j2.F90" -o "$d/fj2_cx.o"
    # shellcheck disable=SC2086
    $fc "${fflags[@]}" -J "$d" "$here/fortran/check_from_fortran.f90" "$d/fj2.o" "$d/fj2_cx.o" "${flibs[@]}" \
        -o "$d/check_from_fortran"
    expect "$d/check_from_fortran" "as expected: f_j2 passes, f_j2_continuum fails"
fi
echo "build-installed: every example built and ran as expected"
