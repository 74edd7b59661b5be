#!/bin/sh
# Installs the bandtemp C library the way Rust C libraries are shipped (the cargo-c layout,
# without needing cargo-c):
#
#   $includedir/bandtemp/bandtemp.h                 the header
#   $libdir/libbandtemp.a                           the static library
#   $libdir/libbandtemp.so.X.Y.Z                    the shared library, SONAME libbandtemp.so.X
#   $libdir/libbandtemp.so.X -> libbandtemp.so.X.Y.Z, libbandtemp.so -> libbandtemp.so.X
#   $libdir/pkgconfig/bandtemp.pc                   pkg-config
#   $libdir/cmake/bandtemp/bandtemp-config.cmake    find_package(bandtemp): bandtemp::bandtemp
#   $libdir/cmake/bandtemp/bandtemp-config-version.cmake   (shared), bandtemp::bandtemp_static
#
#   capi/install.sh [--prefix DIR] [--libdir DIR] [--destdir DIR] [--profile-dir DIR]
#
#   --prefix DIR       installation prefix (default /usr/local)
#   --libdir DIR       library directory (default PREFIX/lib)
#   --destdir DIR      staging root prepended to every path (packaging; DESTDIR in the
#                      environment works too); the .pc and CMake files name the final paths
#   --profile-dir DIR  where the built libraries are (default target/release)
#
# It never builds: build first as yourself, `cargo build --release -p bandtemp-capi`, then
# install (with sudo for a system prefix, followed by `sudo ldconfig`). So nothing in the
# build tree ever belongs to root. (`--no-build` is accepted for old scripts; it is the
# default.) X is the major version: see capi/build.rs for the ABI policy.
#
# Then, for a prefix the dynamic loader does not search:
#   export PKG_CONFIG_PATH=PREFIX/lib/pkgconfig LD_LIBRARY_PATH=PREFIX/lib
#   cc app.c $(pkg-config --cflags --libs bandtemp) -o app && ./app
# Static: cc app.c $(pkg-config --cflags bandtemp) PREFIX/lib/libbandtemp.a
#   $(pkg-config --libs-only-l --static bandtemp | sed 's/-lbandtemp//'), or in CMake
#   target_link_libraries(app PRIVATE bandtemp::bandtemp_static).
set -eu

prefix=/usr/local
libdir=
destdir=${DESTDIR:-}
profile_dir=
while [ $# -gt 0 ]; do
    case "$1" in
        --prefix) prefix=$2; shift 2 ;;
        --libdir) libdir=$2; shift 2 ;;
        --destdir) destdir=$2; shift 2 ;;
        --profile-dir) profile_dir=$2; shift 2 ;;
        --no-build) shift ;;
        -h|--help) sed -n '2,32p' "$0"; exit 0 ;;
        *) echo "install.sh: unknown option $1 (see --help)" >&2; exit 2 ;;
    esac
done

root=$(cd "$(dirname "$0")/.." && pwd)
version=$(sed -n 's/^version = "\([^"]*\)".*/\1/p' "$root/Cargo.toml" | head -n 1)
[ -n "$version" ] || { echo "install.sh: no version in Cargo.toml" >&2; exit 1; }
major=${version%%.*}
libdir=${libdir:-$prefix/lib}
includedir=$prefix/include
profile_dir=${profile_dir:-$root/target/release}

if [ ! -f "$profile_dir/libbandtemp_capi.a" ]; then
    echo "install.sh: no libbandtemp_capi.a in $profile_dir." >&2
    echo "Build it first, as yourself (not as root): cargo build --release -p bandtemp-capi" >&2
    exit 1
fi

# Native libraries the Rust staticlib needs, as
# `cargo rustc --lib --crate-type staticlib -- --print native-static-libs` reports them.
case "$(uname -s)" in
    Darwin) libs_private="-lSystem -lc -lm" ;;
    *) libs_private="-lgcc_s -lutil -lrt -lpthread -lm -ldl -lc" ;;
esac
# Pointer size of the build (the CMake version file refuses a project of another size).
sizeof_void_p=$(( $(getconf LONG_BIT) / 8 ))
# The same for CMake's INTERFACE_LINK_LIBRARIES: "gcc_s;util;..."
libs_private_cmake=$(echo "$libs_private" | sed -e 's/-l//g' -e 's/ /;/g')

install -d "$destdir$includedir/bandtemp" "$destdir$libdir/pkgconfig" \
    "$destdir$libdir/cmake/bandtemp"
install -m 644 "$root/include/bandtemp.h" "$destdir$includedir/bandtemp/bandtemp.h"
install -m 644 "$profile_dir/libbandtemp_capi.a" "$destdir$libdir/libbandtemp.a"

# The build tree names the libraries after the crate (bandtemp_capi); installed, they are
# libbandtemp, with the version in the file name and the SONAME as the link name's target.
if [ -f "$profile_dir/libbandtemp_capi.so" ]; then
    shared=libbandtemp.so.$version
    soname=libbandtemp.so.$major
    if command -v readelf >/dev/null 2>&1; then
        built=$(readelf -d "$profile_dir/libbandtemp_capi.so" | sed -n 's/.*Library soname: \[\(.*\)\].*/\1/p')
        if [ "$built" != "$soname" ]; then
            echo "install.sh: $profile_dir/libbandtemp_capi.so has SONAME '$built', not" >&2
            echo "'$soname' (built before capi/build.rs set it?); rebuild it" >&2
            exit 1
        fi
    fi
    install -m 755 "$profile_dir/libbandtemp_capi.so" "$destdir$libdir/$shared"
    ln -sf "$shared" "$destdir$libdir/$soname"
    ln -sf "$soname" "$destdir$libdir/libbandtemp.so"
elif [ -f "$profile_dir/libbandtemp_capi.dylib" ]; then
    # macOS: no versioned install name yet; link by -L and run with DYLD_LIBRARY_PATH.
    shared=libbandtemp.dylib
    soname=$shared
    install -m 755 "$profile_dir/libbandtemp_capi.dylib" "$destdir$libdir/$shared"
else
    echo "install.sh: no shared library in $profile_dir (static only)" >&2
    exit 1
fi

fill() {
    sed -e "s|@PREFIX@|$prefix|g" \
        -e "s|@LIBDIR@|$libdir|g" \
        -e "s|@INCLUDEDIR@|$includedir|g" \
        -e "s|@VERSION@|$version|g" \
        -e "s|@MAJOR@|$major|g" \
        -e "s|@SHARED@|$shared|g" \
        -e "s|@SONAME@|$soname|g" \
        -e "s|@LIBS_PRIVATE@|$libs_private|g" \
        -e "s|@LIBS_PRIVATE_CMAKE@|$libs_private_cmake|g" \
        -e "s|@SIZEOF_VOID_P@|$sizeof_void_p|g" \
        "$1" > "$2"
    chmod 644 "$2"
}
fill "$root/capi/bandtemp.pc.in" "$destdir$libdir/pkgconfig/bandtemp.pc"
fill "$root/capi/cmake/bandtemp-config.cmake.in" "$destdir$libdir/cmake/bandtemp/bandtemp-config.cmake"
fill "$root/capi/cmake/bandtemp-config-version.cmake.in" \
    "$destdir$libdir/cmake/bandtemp/bandtemp-config-version.cmake"
echo "installed bandtemp $version under $destdir$prefix ($libdir/$shared, SONAME $soname)"
case "$libdir" in
    /lib|/lib64|/usr/lib|/usr/lib64|/usr/lib/*) ;;
    *) echo "outside the loader's default path: run ldconfig (for $libdir in /etc/ld.so.conf.d)" \
        "or set LD_LIBRARY_PATH=$libdir; for pkg-config set PKG_CONFIG_PATH=$libdir/pkgconfig" ;;
esac
