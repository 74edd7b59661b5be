//! Gives the shared library the SONAME it is installed under, as cargo-c does: on ELF
//! targets `libbandtemp.so.<major>`, with <major> the package's major version.
//!
//! ABI policy: the SONAME major changes only when the C ABI breaks (an export removed or
//! its signature changed, a struct's layout changed, a status value given a new meaning),
//! and such a break is released as a new major version. Within a major version the ABI only
//! grows (new exports, new status values). The 0.x series is one ABI, `libbandtemp.so.0`.
//! The installed file carries the full version (`libbandtemp.so.0.1.0`, see install.sh).

fn main() {
    println!("cargo:rerun-if-changed=build.rs");
    let os = std::env::var("CARGO_CFG_TARGET_OS").unwrap_or_default();
    let major = std::env::var("CARGO_PKG_VERSION_MAJOR").unwrap_or_else(|_| "0".to_owned());
    // ELF platforms whose linkers take -soname (GNU ld, gold, lld).
    if matches!(
        os.as_str(),
        "linux" | "android" | "freebsd" | "netbsd" | "openbsd" | "dragonfly" | "illumos"
    ) {
        println!("cargo:rustc-cdylib-link-arg=-Wl,-soname,libbandtemp.so.{major}");
    }
}
