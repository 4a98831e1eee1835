#!/usr/bin/env bash
# Install tancheck's C and Fortran interface (and the command line) under a prefix:
#
#   fortran-shim/install.sh PREFIX
#
#   PREFIX/lib/libtancheck_capi.so, .a        the C API library (cargo build -p tancheck-capi)
#   PREFIX/lib/libtancheck_fortran.a          the Fortran modules' objects (when FC runs)
#   PREFIX/include/tancheck.h, tancheck_routine.h, tancheck_cstep.h, tancheck_finite.h, tancheck_twin.inc
#   PREFIX/include/tancheck/fortran/*.mod     the Fortran modules, for this FC
#   PREFIX/share/tancheck/fortran/*.f90       the modules' sources, for other compilers
#   PREFIX/lib/pkgconfig/tancheck.pc, tancheck-fortran.pc   with the real paths and an rpath
#   PREFIX/lib/cmake/tancheck/tancheckConfig.cmake (+ ConfigVersion)   find_package(tancheck)
#   PREFIX/bin/tancheck, its man pages (share/man/man1) and shell completions (bash, zsh, fish)
#
# Environment:
#   CARGO             cargo to build with (default: cargo)
#   FC                Fortran compiler for the modules (default: gfortran; skipped with a
#                     note when it does not run)
#   TANCHECK_LIB_DIR  take libtancheck_capi.so and .a from this folder instead of building
#                     them (cargo build --release -p tancheck-capi)
#   TANCHECK_BIN      the tancheck program to install instead of building it; `none`: do not
#                     install the command line
set -euo pipefail

if [ $# -ne 1 ] || [ -z "$1" ]; then
    echo "usage: $0 PREFIX" >&2
    exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/.." && pwd)
mkdir -p "$1"
prefix=$(cd "$1" && pwd)
cargo=${CARGO:-cargo}
version=$(sed -n 's/^version = "\(.*\)"$/\1/p' "$root/Cargo.toml" | head -n 1)
[ -n "$version" ] || { echo "install: no version in $root/Cargo.toml" >&2; exit 2; }

libdir="$prefix/lib"
includedir="$prefix/include"
moddir="$includedir/tancheck/fortran"
mkdir -p "$libdir/pkgconfig" "$libdir/cmake/tancheck" "$includedir" "$prefix/share/tancheck/fortran"

# --- the C API library ---------------------------------------------------------------------
build_list=()
[ -n "${TANCHECK_LIB_DIR:-}" ] || build_list+=(-p tancheck-capi)
[ -n "${TANCHECK_BIN:-}" ] || build_list+=(-p tancheck)
if [ ${#build_list[@]} -gt 0 ]; then
    echo "install: $cargo build --release ${build_list[*]}"
    (cd "$root" && "$cargo" build --release "${build_list[@]}")
fi
src_lib=${TANCHECK_LIB_DIR:-$root/target/release}
for f in libtancheck_capi.so libtancheck_capi.a; do
    [ -f "$src_lib/$f" ] || { echo "install: no $f in $src_lib" >&2; exit 2; }
    install -m 0644 "$src_lib/$f" "$libdir/$f"
done
chmod 0755 "$libdir/libtancheck_capi.so"
for h in tancheck.h tancheck_routine.h tancheck_cstep.h tancheck_finite.h tancheck_twin.inc tancheck_block.h tancheck_block_twin.inc; do
    install -m 0644 "$here/include/$h" "$includedir/$h"
done

# --- the Fortran modules -------------------------------------------------------------------
fc=${FC:-gfortran}
fortran=0
for m in tancheck_routine tancheck_cstep tancheck_finite tancheck_block tancheck_api; do
    install -m 0644 "$here/fortran/$m.f90" "$prefix/share/tancheck/fortran/$m.f90"
done
# shellcheck disable=SC2086 # FC may hold a program and leading arguments
if $fc --version >/dev/null 2>&1; then
    work=$(mktemp -d)
    trap 'rm -rf "$work"' EXIT
    mkdir -p "$moddir"
    objs=()
    for m in tancheck_routine tancheck_cstep tancheck_finite tancheck_block tancheck_api; do
        # shellcheck disable=SC2086
        $fc -O2 -fPIC -J "$work" -c "$here/fortran/$m.f90" -o "$work/$m.o"
        objs+=("$work/$m.o")
    done
    install -m 0644 "$work"/*.mod "$moddir/"
    rm -f "$libdir/libtancheck_fortran.a"
    ar rcs "$libdir/libtancheck_fortran.a" "${objs[@]}"
    fortran=1
else
    echo "install: note: no Fortran compiler ($fc does not run): the Fortran modules are installed as sources only, in $prefix/share/tancheck/fortran"
fi

# --- pkg-config ----------------------------------------------------------------------------
sed -e "s|@PREFIX@|$prefix|g" -e "s|@VERSION@|$version|g" "$here/tancheck.pc.in" \
    >"$libdir/pkgconfig/tancheck.pc"
if [ "$fortran" = 1 ]; then
    cat >"$libdir/pkgconfig/tancheck-fortran.pc" <<PC
# tancheck's Fortran modules (tancheck_routine, tancheck_cstep, tancheck_api), built by $fc:
#   gfortran prog.f90 \$(pkg-config --cflags --libs tancheck-fortran)
prefix=$prefix
libdir=$libdir
includedir=$includedir
moddir=$moddir

Name: tancheck-fortran
Description: Fortran modules of tancheck: the routine ABI, complex-step helpers and the C API
Version: $version
Requires: tancheck = $version
Cflags: -I\${moddir} -I\${includedir}
Libs: -L\${libdir} -ltancheck_fortran
PC
fi

# --- CMake ---------------------------------------------------------------------------------
sed -e "s|@VERSION@|$version|g" -e "s|@FORTRAN@|$fortran|g" \
    "$here/cmake/tancheckConfig.cmake.in" >"$libdir/cmake/tancheck/tancheckConfig.cmake"
sed -e "s|@VERSION@|$version|g" \
    "$here/cmake/tancheckConfigVersion.cmake.in" >"$libdir/cmake/tancheck/tancheckConfigVersion.cmake"

# --- the command line ----------------------------------------------------------------------
bin=${TANCHECK_BIN:-$root/target/release/tancheck}
if [ "$bin" != none ]; then
    mkdir -p "$prefix/bin" "$prefix/share/man/man1" "$prefix/share/bash-completion/completions" \
        "$prefix/share/zsh/site-functions" "$prefix/share/fish/vendor_completions.d"
    install -m 0755 "$bin" "$prefix/bin/tancheck"
    "$prefix/bin/tancheck" man --dir "$prefix/share/man/man1" >/dev/null
    "$prefix/bin/tancheck" completions bash >"$prefix/share/bash-completion/completions/tancheck"
    "$prefix/bin/tancheck" completions zsh >"$prefix/share/zsh/site-functions/_tancheck"
    "$prefix/bin/tancheck" completions fish >"$prefix/share/fish/vendor_completions.d/tancheck.fish"
fi

echo "install: tancheck $version installed in $prefix"
echo "  C:       cc prog.c \$(PKG_CONFIG_PATH=$libdir/pkgconfig pkg-config --cflags --libs tancheck)"
[ "$fortran" = 1 ] && echo "  Fortran: $fc prog.f90 \$(PKG_CONFIG_PATH=$libdir/pkgconfig pkg-config --cflags --libs tancheck-fortran)"
echo "  CMake:   find_package(tancheck) with -DCMAKE_PREFIX_PATH=$prefix; targets tancheck::capi$([ "$fortran" = 1 ] && echo ", tancheck::fortran")"
