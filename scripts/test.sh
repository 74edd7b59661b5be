#!/usr/bin/env bash
# The whole test suite, with its own set-up: Rust unit, integration and doc tests (which
# also compile and run the C/C++ callers and the examples), then the Python cross-checks
# against mpmath and scipy. Run from anywhere: `bash scripts/test.sh`.
set -euo pipefail
cd "$(dirname "$0")/.."

# Reference libraries for the cross-checks (no-ops when already installed).
python3 -m pip install --quiet --disable-pip-version-check mpmath scipy numpy

cargo test --all-targets
cargo test --doc

# The C ABI from Python: ctypes against scipy quad and mpmath (seeded cases).
cargo build --lib -p bandtemp-capi
python3 capi/tests/python/ctypes_check.py target/debug/libbandtemp_capi.so

# Regenerate a sample of the stored reference vectors with mpmath and compare.
python3 tools/refgen/planck_refs.py --check

# Refit the moment-integral polynomials (src/planck/moment_fit.rs) with mpmath, compare
# the coefficients, and check the stored ones on a seeded sample (about 15 s).
python3 tools/refgen/moment_fits.py --check
