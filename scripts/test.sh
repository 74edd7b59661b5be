#!/usr/bin/env bash
# The whole test suite, with its own set-up: Rust unit, integration and doc tests (which
# also compile and run the C/C++ callers and the examples), then the Python cross-checks
# against mpmath and scipy. Run from anywhere: `bash scripts/test.sh`.
#
# The Python references live in a virtual environment under target/ (target/pyenv),
# created on the first run (it sees the system's packages); mpmath, scipy and numpy are
# installed into it only when it cannot import them (network access to PyPI is needed
# that once). Nothing is installed system-wide, so this works on a Python that refuses
# global pip installs (PEP 668, "externally-managed-environment"). Set BANDTEMP_PYTHON to use another interpreter that
# already has the three packages.
set -euo pipefail
cd "$(dirname "$0")/.."

python=${BANDTEMP_PYTHON:-}
if [ -z "$python" ]; then
    venv=target/pyenv
    if [ ! -x "$venv/bin/python" ]; then
        mkdir -p target
        python3 -m venv --system-site-packages "$venv" || {
            echo "test.sh: cannot create a Python virtual environment; install Python 3 with" >&2
            echo "its venv module (Debian/Ubuntu: apt-get install python3-venv)" >&2
            exit 1
        }
    fi
    python=$venv/bin/python
    if ! "$python" -c "import mpmath, scipy, numpy" 2>/dev/null; then
        echo "== installing mpmath, scipy, numpy into $venv (first run only)"
        "$python" -m pip install --quiet --disable-pip-version-check mpmath scipy numpy
    fi
fi
"$python" -c "import mpmath, scipy, numpy"

cargo test --all-targets
cargo test --doc
# The proptest strategies and properties for users (feature `proptest`, off by default).
cargo test -p bandtemp --features proptest --test testkit
cargo test -p bandtemp --features proptest --doc testkit

# The C ABI from Python: ctypes against scipy quad and mpmath (seeded cases).
cargo build --lib -p bandtemp-capi
"$python" capi/tests/python/ctypes_check.py target/debug/libbandtemp_capi.so

# Regenerate a sample of the stored reference vectors with mpmath and compare.
"$python" tools/refgen/planck_refs.py --check

# Refit the moment-integral polynomials (src/planck/moment_fit.rs) with mpmath, compare
# the coefficients, and check the stored ones on a seeded sample (about 15 s).
"$python" tools/refgen/moment_fits.py --check

# The operating grid and the fit split at x = 3 (tests/data/band_fit_split.csv): recompute
# every 5th row with mpmath and compare (a few seconds).
"$python" tools/refgen/band_grid_refs.py --check
