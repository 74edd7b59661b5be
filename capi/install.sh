#!/bin/sh
# Installs the bandtemp C library the way Rust crates usually ship one (the cargo-c layout,
# without needing cargo-c): the header in $includedir/bandtemp/, the static and shared
# libraries in $libdir, and a pkg-config file bandtemp.pc in $libdir/pkgconfig.
#
#   capi/install.sh [--prefix DIR] [--libdir DIR] [--destdir DIR] [--profile-dir DIR] [--no-build]
#
#   --prefix DIR       installation prefix (default /usr/local)
#   --libdir DIR       library directory (default PREFIX/lib)
#   --destdir DIR      staging root prepended to every path (packaging); the .pc file still
#                      names the final paths
#   --profile-dir DIR  where the built libraries are (default target/release)
#   --no-build         do not run `cargo build --release --lib` first
#
# Then:  cc app.c $(pkg-config --cflags --libs bandtemp)
# (PKG_CONFIG_PATH=PREFIX/lib/pkgconfig for a prefix pkg-config does not search.) To link
# statically: cc app.c $(pkg-config --cflags bandtemp) PREFIX/lib/libbandtemp.a
# $(pkg-config --libs-only-l --static bandtemp | sed 's/-lbandtemp//').
# The shared library carries no SONAME (cargo-c adds one); link it by path or with -rpath.
set -eu

prefix=/usr/local
libdir=
destdir=
profile_dir=
build=1
while [ $# -gt 0 ]; do
    case "$1" in
        --prefix) prefix=$2; shift 2 ;;
        --libdir) libdir=$2; shift 2 ;;
        --destdir) destdir=$2; shift 2 ;;
        --profile-dir) profile_dir=$2; shift 2 ;;
        --no-build) build=0; shift ;;
        -h|--help) sed -n '2,22p' "$0"; exit 0 ;;
        *) echo "install.sh: unknown option $1 (see --help)" >&2; exit 2 ;;
    esac
done

root=$(cd "$(dirname "$0")/.." && pwd)
version=$(sed -n 's/^version = "\([^"]*\)".*/\1/p' "$root/Cargo.toml" | head -n 1)
[ -n "$version" ] || { echo "install.sh: no version in Cargo.toml" >&2; exit 1; }
libdir=${libdir:-$prefix/lib}
includedir=$prefix/include
profile_dir=${profile_dir:-$root/target/release}

if [ "$build" = 1 ]; then
    (cd "$root" && cargo build --release --lib -p bandtemp-capi)
fi

# Native libraries the Rust staticlib needs, as
# `cargo rustc --lib --crate-type staticlib -- --print native-static-libs` reports them.
case "$(uname -s)" in
    Darwin) libs_private="-lSystem -lc -lm" ;;
    *) libs_private="-lgcc_s -lutil -lrt -lpthread -lm -ldl -lc" ;;
esac

install -d "$destdir$includedir/bandtemp" "$destdir$libdir/pkgconfig"
install -m 644 "$root/include/bandtemp.h" "$destdir$includedir/bandtemp/bandtemp.h"
install -m 644 "$profile_dir/libbandtemp_capi.a" "$destdir$libdir/libbandtemp.a"
# The build tree names the libraries after the crate (bandtemp_capi); installed, they are
# libbandtemp.
for ext in so dylib; do
    if [ -f "$profile_dir/libbandtemp_capi.$ext" ]; then
        install -m 755 "$profile_dir/libbandtemp_capi.$ext" "$destdir$libdir/libbandtemp.$ext"
    fi
done
sed -e "s|@PREFIX@|$prefix|g" \
    -e "s|@LIBDIR@|$libdir|g" \
    -e "s|@INCLUDEDIR@|$includedir|g" \
    -e "s|@VERSION@|$version|g" \
    -e "s|@LIBS_PRIVATE@|$libs_private|g" \
    "$root/capi/bandtemp.pc.in" > "$destdir$libdir/pkgconfig/bandtemp.pc"
echo "installed bandtemp $version under $destdir$prefix (pkg-config: $libdir/pkgconfig/bandtemp.pc)"
