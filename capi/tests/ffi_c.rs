//! The C ABI from the outside: `tests/c/ffi_test.c` compiled with the system C compiler
//! (C99, `-Wall -Wextra -Werror -pedantic`) and as C++17 against `include/bandtemp.h` and
//! the staticlib, then run; again under AddressSanitizer + UndefinedBehaviorSanitizer where
//! the compiler supports them; and the README example (`tests/c/readme_example.c`).
//!
//! The compilers are `$CC` and `$CXX` (default `cc` and `c++`). The staticlib is built by
//! the test itself (`cargo build --lib` into a target directory of its own, so that it
//! never waits on the outer build's lock and is never stale).

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

/// The workspace root (this crate lives in `capi/`).
fn root() -> &'static Path {
    Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/.."))
}

fn scratch() -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("ffi_c");
    std::fs::create_dir_all(&dir).expect("create the scratch directory");
    dir
}

/// Builds the debug staticlib once per test run and returns its directory.
fn library_dir() -> &'static Path {
    static DIR: OnceLock<PathBuf> = OnceLock::new();
    DIR.get_or_init(|| {
        let target_dir = scratch().join("target");
        let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".to_owned());
        let status = Command::new(cargo)
            .args([
                "build",
                "--lib",
                "--quiet",
                "-p",
                "bandtemp-capi",
                "--manifest-path",
            ])
            .arg(root().join("Cargo.toml"))
            .arg("--target-dir")
            .arg(&target_dir)
            .status()
            .expect("run cargo build --lib");
        assert!(status.success(), "cargo build --lib failed");
        let dir = target_dir.join("debug");
        assert!(
            dir.join("libbandtemp_capi.a").is_file(),
            "no libbandtemp_capi.a in {}",
            dir.display()
        );
        dir
    })
}

/// Native libraries the Rust staticlib needs on this platform
/// (`cargo rustc --lib --crate-type staticlib -- --print native-static-libs`).
fn native_libs() -> &'static [&'static str] {
    if cfg!(target_os = "macos") {
        &["-lSystem", "-lc", "-lm"]
    } else {
        &[
            "-lgcc_s",
            "-lutil",
            "-lrt",
            "-lpthread",
            "-lm",
            "-ldl",
            "-lc",
        ]
    }
}

fn compiler(var: &str, default: &str) -> String {
    std::env::var(var).unwrap_or_else(|_| default.to_owned())
}

const WARNINGS: &[&str] = &["-Wall", "-Wextra", "-Werror", "-pedantic"];

/// Compiles `source` with `compiler` and `flags`, links the staticlib, and returns the
/// executable. Panics with the compiler's output on failure.
fn build(compiler: &str, flags: &[&str], source: &str, name: &str) -> PathBuf {
    let exe = scratch().join(name);
    let output = Command::new(compiler)
        .args(flags)
        .args(WARNINGS)
        .arg("-I")
        .arg(root().join("include"))
        .arg(root().join(source))
        .arg("-o")
        .arg(&exe)
        // Ends any `-x c++`: the archive is linker input, not source.
        .args(["-x", "none"])
        .arg(library_dir().join("libbandtemp_capi.a"))
        .args(native_libs())
        .output()
        .unwrap_or_else(|e| panic!("cannot run the compiler `{compiler}`: {e} (set CC/CXX)"));
    assert!(
        output.status.success(),
        "`{compiler} {}` failed on {source}:\n{}{}",
        flags.join(" "),
        String::from_utf8_lossy(&output.stdout),
        String::from_utf8_lossy(&output.stderr)
    );
    exe
}

/// Runs an executable and returns its stdout; panics with its output unless it exits 0.
fn run(exe: &Path) -> String {
    run_with_library_path(exe, None)
}

/// As [`run`], with `LD_LIBRARY_PATH` set to `library_path` (None: unset).
fn run_with_library_path(exe: &Path, library_path: Option<&Path>) -> String {
    let mut command = Command::new(exe);
    // cargo test puts target/*/ on the loader path, where a stale uplifted library may
    // sit; the programs must load the library they were linked against (static, or the
    // installed one found through LD_LIBRARY_PATH and its SONAME).
    command.env_remove("LD_LIBRARY_PATH");
    if let Some(path) = library_path {
        command.env("LD_LIBRARY_PATH", path);
    }
    let output = command
        .env("ASAN_OPTIONS", "detect_leaks=1:abort_on_error=1")
        .env("UBSAN_OPTIONS", "print_stacktrace=1:halt_on_error=1")
        .output()
        .unwrap_or_else(|e| panic!("cannot run {}: {e}", exe.display()));
    let stdout = String::from_utf8_lossy(&output.stdout).into_owned();
    let stderr = String::from_utf8_lossy(&output.stderr);
    assert!(
        output.status.success(),
        "{} failed ({}):\n{stdout}{stderr}",
        exe.display(),
        output.status
    );
    print!("{stdout}");
    stdout
}

/// The C test program's closing line, "N passed, 0 failed", with N above a floor that
/// proves it ran its checks.
fn assert_summary(stdout: &str) {
    let summary = stdout
        .lines()
        .rev()
        .find(|line| line.contains(" passed, "))
        .expect("the C test prints 'N passed, N failed'");
    let mut words = summary.split_whitespace();
    let passed: u32 = words.next().and_then(|w| w.parse().ok()).unwrap_or(0);
    assert!(
        summary.ends_with(" passed, 0 failed"),
        "C checks failed: {summary}"
    );
    assert!(passed > 1000, "too few C checks ran: {summary}");
}

#[test]
fn c99_program_passes() {
    let cc = compiler("CC", "cc");
    let exe = build(
        &cc,
        &["-std=c99", "-O1"],
        "capi/tests/c/ffi_test.c",
        "ffi_test_c99",
    );
    assert_summary(&run(&exe));
}

#[test]
fn cpp17_program_passes() {
    let cxx = compiler("CXX", "c++");
    let exe = build(
        &cxx,
        &["-x", "c++", "-std=c++17", "-O1"],
        "capi/tests/c/ffi_test.c",
        "ffi_test_cpp17",
    );
    assert_summary(&run(&exe));
}

/// Whether `compiler` can build and run a program with `flags` (sanitizers need runtime
/// support that some systems and containers lack).
fn supports(compiler: &str, flags: &[&str]) -> bool {
    let dir = scratch();
    let source = dir.join("probe.c");
    let exe = dir.join("probe");
    std::fs::write(&source, "int main(void) { return 0; }\n").expect("write probe.c");
    let built = Command::new(compiler)
        .args(flags)
        .arg(&source)
        .arg("-o")
        .arg(&exe)
        .output()
        .is_ok_and(|o| o.status.success());
    built
        && Command::new(&exe)
            .output()
            .is_ok_and(|o| o.status.success())
}

#[test]
fn c99_program_passes_under_address_and_undefined_sanitizers() {
    let cc = compiler("CC", "cc");
    let sanitize = [
        "-fsanitize=address,undefined",
        "-fno-sanitize-recover=all",
        "-fno-omit-frame-pointer",
    ];
    if !supports(&cc, &sanitize) {
        println!("note: `{cc}` cannot build and run with {sanitize:?} here; sanitizer run skipped");
        return;
    }
    let mut flags = vec!["-std=c99", "-O1", "-g"];
    flags.extend(sanitize);
    let exe = build(&cc, &flags, "capi/tests/c/ffi_test.c", "ffi_test_asan");
    assert_summary(&run(&exe));
}

#[test]
fn cpp17_program_passes_under_address_and_undefined_sanitizers() {
    let cxx = compiler("CXX", "c++");
    let sanitize = [
        "-fsanitize=address,undefined",
        "-fno-sanitize-recover=all",
        "-fno-omit-frame-pointer",
    ];
    if !supports(&cxx, &sanitize) {
        println!(
            "note: `{cxx}` cannot build and run with {sanitize:?} here; sanitizer run skipped"
        );
        return;
    }
    let mut flags = vec!["-x", "c++", "-std=c++17", "-O1", "-g"];
    flags.extend(sanitize);
    let exe = build(&cxx, &flags, "capi/tests/c/ffi_test.c", "ffi_test_cpp_asan");
    assert_summary(&run(&exe));
}

/// The README's C example compiles as written (C99 and C++17) and prints the object
/// temperature. Expected value: 360.000 K, the temperature whose measurement-equation
/// signal the example passes in (computed independently with scipy.integrate.quad over
/// Planck's law with scipy.constants, see the comment in readme_example.c).
#[test]
fn readme_example_compiles_and_runs() {
    let cc = compiler("CC", "cc");
    let cxx = compiler("CXX", "c++");
    for (exe, name) in [
        (
            build(
                &cc,
                &["-std=c99"],
                "capi/tests/c/readme_example.c",
                "readme_c99",
            ),
            "C99",
        ),
        (
            build(
                &cxx,
                &["-x", "c++", "-std=c++17"],
                "capi/tests/c/readme_example.c",
                "readme_cpp17",
            ),
            "C++17",
        ),
    ] {
        let stdout = run(&exe);
        assert_eq!(
            stdout.trim(),
            "object: 360.000 K",
            "README example ({name})"
        );
    }
}

/// The install recipe (capi/install.sh, cargo-c layout) into a scratch prefix, then the
/// README example built with the flags `pkg-config` gives for the installed bandtemp.pc
/// and run against the installed shared library, found through LD_LIBRARY_PATH and its
/// SONAME (no rpath). `capi/tests/consumer/run.sh`, which CI runs, does the same with the
/// release build and CMake as well, and fails where this test skips for want of pkg-config.
#[test]
fn pkg_config_install_recipe_builds_the_readme_example() {
    let probe = Command::new("pkg-config").arg("--version").output();
    if !probe.is_ok_and(|o| o.status.success()) {
        println!("note: no pkg-config on this system; install-recipe test skipped");
        return;
    }
    let prefix = scratch().join("prefix");
    let _ = std::fs::remove_dir_all(&prefix);
    let status = Command::new("sh")
        .arg(root().join("capi/install.sh"))
        .arg("--no-build")
        .arg("--prefix")
        .arg(&prefix)
        .arg("--profile-dir")
        .arg(library_dir())
        .status()
        .expect("run capi/install.sh");
    assert!(status.success(), "capi/install.sh failed");
    let pc_dir = prefix.join("lib/pkgconfig");
    let pkg_config = |args: &[&str]| -> String {
        let output = Command::new("pkg-config")
            .env("PKG_CONFIG_PATH", &pc_dir)
            .args(args)
            .arg("bandtemp")
            .output()
            .expect("run pkg-config");
        assert!(
            output.status.success(),
            "pkg-config {args:?} bandtemp failed"
        );
        String::from_utf8(output.stdout)
            .expect("UTF-8")
            .trim()
            .to_owned()
    };
    assert_eq!(pkg_config(&["--modversion"]), env!("CARGO_PKG_VERSION"));
    let flags = pkg_config(&["--cflags", "--libs"]);
    let exe = scratch().join("readme_pkg_config");
    let output = Command::new(compiler("CC", "cc"))
        .args(["-std=c99"])
        .args(WARNINGS)
        .arg(root().join("capi/tests/c/readme_example.c"))
        .args(flags.split_whitespace())
        .arg("-o")
        .arg(&exe)
        .output()
        .expect("run the C compiler");
    assert!(
        output.status.success(),
        "building the README example with `{flags}` failed:\n{}",
        String::from_utf8_lossy(&output.stderr)
    );
    assert_eq!(
        run_with_library_path(&exe, Some(&prefix.join("lib"))).trim(),
        "object: 360.000 K"
    );
}

/// The firmware-style frame example (`tests/c/frame_example.c`, static storage only)
/// compiles as C99 with `-Wall -Wextra -Werror -pedantic`, converts its invented frame, and
/// its checked pixels agree with `bt_object_temperature` (exact inversion of the
/// measurement equation) within 1 mK, which the program itself checks (exit status).
#[test]
fn frame_example_compiles_and_runs() {
    let cc = compiler("CC", "cc");
    let exe = build(
        &cc,
        &["-std=c99"],
        "capi/tests/c/frame_example.c",
        "frame_example_c99",
    );
    let stdout = run(&exe);
    assert!(
        stdout.starts_with("10 of 12 pixels converted (1 dead, 1 saturated)"),
        "frame example: {stdout}"
    );
    assert_eq!(
        stdout.matches("pixel ").count(),
        3,
        "frame example: {stdout}"
    );
}
