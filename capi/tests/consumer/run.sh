#!/usr/bin/env bash
# The README's C recipe, run as written: build the C library as the current user, install
# it into a scratch prefix with capi/install.sh, then build the README example
# (capi/tests/c/readme_example.c, as app.c) with pkg-config and with CMake
# (find_package(bandtemp), this directory's CMakeLists.txt) and run both against the
# installed shared library, found by the loader through LD_LIBRARY_PATH and the SONAME (no
# rpath). Then checks what a package needs: the SONAME, the versioned names and links, no
# rpath in the programs, the static library through CMake, and a DESTDIR staging install.
#
# Needs cargo, a C compiler, pkg-config, cmake and readelf; a missing one fails the run.
# Usage: bash capi/tests/consumer/run.sh [SCRATCH_DIR]   (default target/consumer)
set -euo pipefail
root=$(cd "$(dirname "$0")/../../.." && pwd)
scratch=${1:-$root/target/consumer}
for tool in cargo cc pkg-config cmake readelf; do
    command -v "$tool" >/dev/null || { echo "run.sh: $tool is required" >&2; exit 1; }
done
rm -rf "$scratch"
mkdir -p "$scratch/app"
cp "$root/capi/tests/c/readme_example.c" "$scratch/app/app.c"
cp "$root/capi/tests/consumer/CMakeLists.txt" "$scratch/app/CMakeLists.txt"
PREFIX=$scratch/prefix
APP=$scratch/app
unset LD_LIBRARY_PATH PKG_CONFIG_PATH
cd "$root"
log=$scratch/recipe.log

(
# README recipe begins
cargo build --release -p bandtemp-capi      # as yourself: install.sh never builds
capi/install.sh --prefix "$PREFIX"          # system prefix: sudo capi/install.sh ...; sudo ldconfig
cd "$APP"                                   # your program: app.c, and CMakeLists.txt below
export PKG_CONFIG_PATH="$PREFIX/lib/pkgconfig" LD_LIBRARY_PATH="$PREFIX/lib"  # prefix not in ldconfig
cc app.c $(pkg-config --cflags --libs bandtemp) -o app && ./app
cmake -S . -B build -DCMAKE_PREFIX_PATH="$PREFIX" && cmake --build build && ./build/app
# README recipe ends
) 2>&1 | tee "$log"

fail() { echo "run.sh: $*" >&2; exit 1; }
runs=$(grep -c '^object: 360.000 K$' "$log" || true)
[ "$runs" = 2 ] || fail "expected 'object: 360.000 K' from the pkg-config and the CMake program, got $runs"

version=$(sed -n 's/^version = "\([^"]*\)".*/\1/p' "$root/Cargo.toml" | head -n 1)
major=${version%%.*}
lib=$PREFIX/lib
[ -f "$lib/libbandtemp.so.$version" ] && [ ! -L "$lib/libbandtemp.so.$version" ] \
    || fail "no libbandtemp.so.$version"
[ "$(readlink "$lib/libbandtemp.so.$major")" = "libbandtemp.so.$version" ] \
    || fail "libbandtemp.so.$major does not link to libbandtemp.so.$version"
[ "$(readlink "$lib/libbandtemp.so")" = "libbandtemp.so.$major" ] \
    || fail "libbandtemp.so does not link to libbandtemp.so.$major"
readelf -d "$lib/libbandtemp.so.$version" | grep -q "Library soname: \[libbandtemp.so.$major\]" \
    || fail "SONAME is not libbandtemp.so.$major"
[ -f "$lib/libbandtemp.a" ] || fail "no libbandtemp.a"
[ -f "$PREFIX/include/bandtemp/bandtemp.h" ] || fail "no header"
for exe in "$APP/app" "$APP/build/app"; do
    readelf -d "$exe" | grep -q "NEEDED.*\[libbandtemp.so.$major\]" \
        || fail "$exe does not need libbandtemp.so.$major"
    if readelf -d "$exe" | grep -q "RPATH\|RUNPATH"; then fail "$exe carries an rpath"; fi
done
# Without LD_LIBRARY_PATH the loader must not find the library in a scratch prefix (proves
# the runs above used the installed copy through the documented variable, not an rpath).
if "$APP/app" >/dev/null 2>&1; then fail "app ran without LD_LIBRARY_PATH: an rpath?"; fi
# The static target: no shared bandtemp needed at run time.
readelf -d "$APP/build/app_static" | grep -q "libbandtemp" && fail "app_static needs a shared bandtemp"
[ "$("$APP/build/app_static")" = "object: 360.000 K" ] || fail "app_static output"
# pkg-config metadata.
export PKG_CONFIG_PATH=$lib/pkgconfig
[ "$(pkg-config --modversion bandtemp)" = "$version" ] || fail "pkg-config version"
pkg-config --static --libs bandtemp | grep -q -- "-lpthread" || fail "Libs.private"
grep -q '^URL:' "$lib/pkgconfig/bandtemp.pc" && fail "bandtemp.pc names a URL"
# DESTDIR staging: everything under the staging root, the metadata naming the final paths.
stage=$scratch/stage
DESTDIR=$stage capi/install.sh --prefix /opt/bandtemp >/dev/null
[ -L "$stage/opt/bandtemp/lib/libbandtemp.so.$major" ] || fail "DESTDIR install"
grep -q '^libdir=/opt/bandtemp/lib$' "$stage/opt/bandtemp/lib/pkgconfig/bandtemp.pc" \
    || fail "DESTDIR leaked into bandtemp.pc"
grep -q "$stage" "$stage/opt/bandtemp/lib/cmake/bandtemp/bandtemp-config.cmake" \
    && fail "DESTDIR leaked into bandtemp-config.cmake"
echo "consumer checks passed (pkg-config, CMake shared and static, SONAME, links, DESTDIR)"
