//! A minimal `no_std` Rust firmware on the `bandtemp` core (invented instrument and data).
//!
//! On `thumbv7em-none-eabihf` it is a bare-metal program with its own vector table,
//! reset handler (which enables the FPU), panic handler and semihosting output
//! (`target.rs`); it depends on the core crate alone, with `default-features = false`.
//! On the host the same computations run as an ordinary program. `scripts/firmware.sh
//! rust` runs both and compares their output byte for byte: every number is printed as
//! its bit pattern.
#![cfg_attr(target_os = "none", no_std, no_main)]

mod report;

#[cfg(target_os = "none")]
mod target;

/// The host build: the same report, to stdout.
#[cfg(not(target_os = "none"))]
fn main() {
    use std::io::Write;

    struct Stdout(std::io::Stdout);
    impl report::Sink for Stdout {
        fn text(&mut self, text: &str) {
            // A failed write to stdout shows as a difference from the target's output.
            let _ = self.0.write_all(text.as_bytes());
        }
    }
    let mut out = Stdout(std::io::stdout());
    let code = report::run(&mut out);
    let _ = out.0.flush();
    std::process::exit(code);
}
