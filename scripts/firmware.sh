#!/usr/bin/env bash
# Firmware checks on emulated Cortex-M cores (QEMU MPS2 AN386 = Cortex-M4F, AN500 =
# Cortex-M7), run from anywhere:
#
#   bash scripts/firmware.sh check     what CI runs: tools, c, rust, proof
#   bash scripts/firmware.sh tools     fail unless the cross tools are installed
#   bash scripts/firmware.sh c         the C firmware example on both cores vs the host
#   bash scripts/firmware.sh rust      the no_std Rust firmware on both cores vs the host
#   bash scripts/firmware.sh proof     the link-time proof that no export can panic
#   bash scripts/firmware.sh measure   flash, stack, instructions and start-up budgets
#
# Cross tools (Debian packages; .ci/run installs them): rustc-web cargo-web rust-web-src
# (a second Rust toolchain with its library sources, for -Zbuild-std), gcc-arm-none-eabi,
# qemu-system-arm. The host side uses the normal (rustup) toolchain and the host C
# compiler. Outputs go to target/firmware/.
set -euo pipefail
cd "$(dirname "$0")/.."

OUT=target/firmware
TRIPLE=thumbv7em-none-eabihf
XRUSTC=${BANDTEMP_XRUSTC:-/usr/bin/rustc}
XCARGO=${BANDTEMP_XCARGO:-/usr/bin/cargo}
QEMU=${BANDTEMP_QEMU:-qemu-system-arm}
QEMU_TIMEOUT=${BANDTEMP_QEMU_TIMEOUT:-300}
CORES=(mps2-an386 mps2-an500)
# Cortex-M4F code (the thumbv7em-none-eabihf baseline: single-precision FPU); the same
# image runs on the Cortex-M7.
ARM_CFLAGS=(-mcpu=cortex-m4 -mthumb -mfloat-abi=hard -mfpu=fpv4-sp-d16 -O2 -std=c99
    -Wall -Wextra -Werror -ffreestanding -ffunction-sections -fdata-sections
    -Iinclude -Ifirmware/c)
ARM_LDFLAGS=(-nostdlib -nostartfiles -T firmware/link.ld -Wl,--gc-sections
    -Wl,-z,noexecstack)
FW_RUNTIME=(firmware/c/startup.c firmware/c/semihost.c firmware/c/fw_io.c)

mkdir -p "$OUT"

die() {
    echo "firmware: $*" >&2
    exit 1
}

tools() {
    local missing=()
    [[ -x $XRUSTC ]] || missing+=("rustc-web ($XRUSTC)")
    [[ -x $XCARGO ]] || missing+=("cargo-web ($XCARGO)")
    [[ -d /usr/lib/rustlib/src/rust/library ]] || missing+=("rust-web-src")
    command -v arm-none-eabi-gcc >/dev/null || missing+=("gcc-arm-none-eabi")
    command -v "$QEMU" >/dev/null || missing+=("qemu-system-arm")
    command -v cc >/dev/null || missing+=("a host C compiler (gcc)")
    if ((${#missing[@]})); then
        die "missing: ${missing[*]}; install with: apt-get install -y rustc-web cargo-web rust-web-src gcc-arm-none-eabi qemu-system-arm"
    fi
    "$XRUSTC" --version
    arm-none-eabi-gcc --version | sed -n 1p
    "$QEMU" --version | sed -n 1p
}

# Debian's cargo and rustc for the target: core and compiler_builtins built from source
# (with the mem feature: memcpy and friends), nightly flags through RUSTC_BOOTSTRAP.
# `--ignore-rust-version`: the workspace's rust-version (1.88) is that of its test
# dependencies; the libraries themselves also build with older compilers (Debian 12's
# rustc-web has shipped 1.85 and, after an update, 1.96).
# One target directory serves every variant (the features and profiles hash apart).
xcargo() {
    nice env PATH=/usr/bin:$PATH RUSTC="$XRUSTC" RUSTC_BOOTSTRAP=1 \
        CARGO_TARGET_DIR="$PWD/$OUT/cargo" "$XCARGO" "$@"
}

# The C library for the target, no_std: `trap` (its panic handler is an undefined
# instruction) or `proof` (the panic handler references an undefined symbol). A second
# argument sets the opt-level (default: the release profile's). Prints the archive path.
xlib() {
    local variant=$1 opt=${2:-} features=() dest
    [[ $variant == proof ]] && features=(--features panic-proof)
    dest=$OUT/lib-$variant${opt:+-O$opt}
    mkdir -p "$dest"
    CARGO_PROFILE_RELEASE_OPT_LEVEL=${opt:-3} xcargo rustc --quiet --release --lib \
        --ignore-rust-version -p bandtemp-capi --no-default-features "${features[@]}" --crate-type staticlib \
        -Zbuild-std=core,compiler_builtins -Zbuild-std-features=compiler-builtins-mem \
        --target "$TRIPLE" >&2
    cp "$OUT/cargo/$TRIPLE/release/libbandtemp_capi.a" "$dest/"
    echo "$dest/libbandtemp_capi.a"
}

# Links a firmware image: elf name, archive, C sources (and -D flags).
link_fw() {
    local elf=$1 lib=$2
    shift 2
    arm-none-eabi-gcc "${ARM_CFLAGS[@]}" "${ARM_LDFLAGS[@]}" "${FW_RUNTIME[@]}" "$@" \
        "$lib" -lgcc -o "$elf"
}

# Runs an image on one emulated core; semihosting output to a file; the exit code is the
# firmware's. Extra QEMU arguments follow.
run_fw() {
    local core=$1 elf=$2 out=$3
    shift 3
    timeout "$QEMU_TIMEOUT" "$QEMU" -M "$core" -nographic -monitor none -serial none \
        -chardev "file,id=semihost,path=$out" \
        -semihosting-config enable=on,target=native,chardev=semihost "$@" -kernel "$elf"
}

# Runs an image on both cores and compares each output with the host's, byte for byte.
compare_cores() {
    local name=$1 elf=$2 host_out=$3 lines core out
    lines=$(wc -l <"$host_out")
    ((lines > 20)) || die "$name: the host run printed only $lines lines"
    for core in "${CORES[@]}"; do
        out=$OUT/$name-$core.txt
        rm -f "$out"
        if ! run_fw "$core" "$elf" "$out"; then
            cat "$out" >&2 || true
            die "$name on $core: nonzero exit"
        fi
        if ! cmp -s "$host_out" "$out"; then
            diff "$host_out" "$out" | head -n 20 >&2 || true
            die "$name on $core differs from the host"
        fi
        echo "$name on $core: $lines lines, identical to the host (bit patterns)"
    done
}

c_example() {
    local lib
    echo "== C firmware example: build the host and target libraries"
    nice cargo build --quiet --release -p bandtemp-capi
    gcc -std=c99 -O2 -Wall -Wextra -Werror -Iinclude -Ifirmware/c firmware/c/example.c \
        firmware/c/fw_io.c firmware/c/host.c target/release/libbandtemp_capi.a \
        -lm -lpthread -ldl -o "$OUT/example-host"
    "$OUT/example-host" >"$OUT/example-host.txt"
    lib=$(xlib trap)
    link_fw "$OUT/example.elf" "$lib" firmware/c/example.c
    arm-none-eabi-size "$OUT/example.elf"
    compare_cores example "$OUT/example.elf" "$OUT/example-host.txt"
}

rust_firmware() {
    local dir=firmware/rust elf
    echo "== Rust firmware (no_std, its own panic handler, the core crate only)"
    (cd "$dir" && CARGO_TARGET_DIR=$PWD/../../$OUT/cargo-rust-host nice cargo clippy --quiet \
        --release -- -D warnings -W clippy::pedantic)
    (cd "$dir" && CARGO_TARGET_DIR=$PWD/../../$OUT/cargo-rust-host nice cargo run --quiet \
        --release) >"$OUT/rust-host.txt"
    # The same target directory as the C library: core and the bandtemp core built for
    # the target with the same profile are shared.
    (cd "$dir" && nice env PATH=/usr/bin:$PATH RUSTC="$XRUSTC" RUSTC_BOOTSTRAP=1 \
        CARGO_TARGET_DIR="$PWD/../../$OUT/cargo" "$XCARGO" build --quiet --release \
        --ignore-rust-version --target "$TRIPLE" -Zbuild-std=core,compiler_builtins \
        -Zbuild-std-features=compiler-builtins-mem)
    elf=$OUT/cargo/$TRIPLE/release/bandtemp-firmware-demo
    arm-none-eabi-size "$elf"
    compare_cores rust "$elf" "$OUT/rust-host.txt"
}

# The exports the header declares, one per line, sorted.
header_exports() {
    grep -oE '^[A-Za-z_][A-Za-z0-9_ ]*[ *]bt_[a-z0-9_]+\(' include/bandtemp.h |
        grep -oE 'bt_[a-z0-9_]+\($' | tr -d '(' | sort
}

# A firmware source that takes the address of every export in the list (a volatile
# table, so --gc-sections keeps every export and all it can reach).
exports_source() {
    echo '/* Generated by scripts/firmware.sh from include/bandtemp.h. */'
    echo '#include "bandtemp.h"'
    echo '#include "fw_io.h"'
    echo 'typedef void (*fw_export)(void);'
    echo 'static const fw_export volatile exports[] = {'
    sed 's/.*/    (fw_export)&,/' "$1"
    echo '};'
    echo 'int fw_main(void) {'
    echo '    unsigned i, n = sizeof exports / sizeof exports[0];'
    echo '    for (i = 0; i < n; i++) { if (exports[i] == 0) { return 1; } }'
    echo '    fw_line_u64("exports linked", n);'
    echo '    return 0;'
    echo '}'
}

proof() {
    local lib n list=$OUT/exports.txt
    echo "== link-time proof: no export can reach a panic"
    lib=$(xlib proof)
    header_exports >"$list"
    n=$(wc -l <"$list")
    ((n >= 38)) || die "proof: only $n exports found in include/bandtemp.h"
    # The list must be exactly the library's exported bt_ functions: nothing the header
    # declares may be missing from the library, nothing the library exports from the list.
    arm-none-eabi-nm --defined-only -g "$lib" 2>/dev/null | awk '$2 == "T" { print $3 }' |
        grep '^bt_' | sort >"$OUT/exports-lib.txt"
    if ! cmp -s "$list" "$OUT/exports-lib.txt"; then
        diff "$list" "$OUT/exports-lib.txt" >&2 || true
        die "proof: the header's exports (<) and the library's (>) differ"
    fi
    # With LTO the archive keeps only what the exports reach, so when no panic path
    # survives it holds no panic handler at all; when one does, the handler stays and its
    # reference to the undefined bandtemp_panic_path_reachable fails the link below.
    exports_source "$list" >"$OUT/exports.c"
    if ! link_fw "$OUT/proof.elf" "$lib" "$OUT/exports.c" 2>"$OUT/proof-link.txt"; then
        cat "$OUT/proof-link.txt" >&2
        echo "exports that reach a panic path:" >&2
        local name
        while read -r name; do
            echo "$name" >"$OUT/one-export.txt"
            exports_source "$OUT/one-export.txt" >"$OUT/one-export.c"
            link_fw "$OUT/one-export.elf" "$lib" "$OUT/one-export.c" 2>/dev/null ||
                echo "  $name" >&2
        done <"$list"
        die "proof: a panic path survives (see above)"
    fi
    run_fw mps2-an386 "$OUT/proof.elf" "$OUT/proof-run.txt" || die "proof image did not run"
    grep -qx "exports linked $n" "$OUT/proof-run.txt" || die "proof image: unexpected output"
    echo "proof: all $n exports of include/bandtemp.h linked with the panic-proof handler; no panic path"
}

measure() {
    local lib lib_s level mark
    echo "== budgets (Cortex-M4F, MPS2 AN386)"
    lib=$(xlib trap)
    lib_s=$(xlib trap s)
    # Flash: the C example at each level, with the release profile (opt-level 3) and
    # with opt-level "s".
    : >"$OUT/flash.txt"
    for level in 1 2 3; do
        link_fw "$OUT/level$level.elf" "$lib" -DFW_LEVEL=$level firmware/c/example.c
        link_fw "$OUT/level$level-s.elf" "$lib_s" -DFW_LEVEL=$level firmware/c/example.c
        echo "$level $(arm-none-eabi-size -A "$OUT/level$level.elf" | awk '$1 == ".text" { print $2 }') $(arm-none-eabi-size -A "$OUT/level$level-s.elf" | awk '$1 == ".text" { print $2 }')" >>"$OUT/flash.txt"
    done
    # Instructions and stack: the measuring firmware under the counting plugin.
    cc -shared -fPIC -O2 -Wall -Wextra -Werror -o "$OUT/insncount.so" firmware/tools/insncount.c
    for variant in O3 Os; do
        local l=$lib
        [[ $variant == Os ]] && l=$lib_s
        link_fw "$OUT/measure-$variant.elf" "$l" firmware/c/measure.c
        mark=$(arm-none-eabi-nm "$OUT/measure-$variant.elf" | awk '$3 == "fw_mark" { print $1 }')
        [[ -n $mark ]] || die "measure: no fw_mark symbol"
        rm -f "$OUT/measure-$variant.txt" "$OUT/measure-$variant.log"
        run_fw mps2-an386 "$OUT/measure-$variant.elf" "$OUT/measure-$variant.txt" \
            -plugin "$OUT/insncount.so,mark=0x$mark" -d plugin -D "$OUT/measure-$variant.log" ||
            { cat "$OUT/measure-$variant.txt" >&2; die "measure ($variant): nonzero exit"; }
    done
    python3 firmware/tools/budgets.py "$OUT" | tee "$OUT/budgets.md"
    echo
    echo "Largest functions of the full C example (opt-level 3), bytes:"
    # awk reads all of its input and keeps 10 lines (a `head` would close the pipe early,
    # and with pipefail the writer's SIGPIPE fails the script).
    arm-none-eabi-nm --size-sort -S -r -C "$OUT/level3.elf" |
        awk '$3 ~ /^[tTrR]$/ && n++ < 10' |
        while read -r _ size _ name; do printf '%8d  %s\n' "0x$size" "$name"; done
}

case ${1:-check} in
tools) tools ;;
c) tools && c_example ;;
rust) tools && rust_firmware ;;
proof) tools && proof ;;
measure) tools && measure ;;
check)
    tools
    c_example
    rust_firmware
    proof
    ;;
*) die "unknown command '$1' (check, tools, c, rust, proof, measure)" ;;
esac
