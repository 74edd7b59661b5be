#!/usr/bin/env bash
# Instruction counts per call from valgrind's callgrind (noise-free, unlike times):
# rectangular band radiance and inversion over the sweep grid of benches/sweep.rs, band
# radiance over the 100-point tabulated response of benches/band.rs (300 K and 1500 K, both
# detectors; printed per point), and the frame converter per pixel. Builds examples/instruction_counts.rs in release, runs it
# once under callgrind with a profile dump on entry to each measured region, and
# prints per-call counts (per regime: min / median / max over the temperatures; with
# --all, every point). Needs valgrind. Usage: bash scripts/instructions.sh [--all]
set -euo pipefail
cd "$(dirname "$0")/.."
command -v valgrind >/dev/null || { echo "valgrind is required" >&2; exit 1; }
cargo build --quiet --release --example instruction_counts
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
valgrind --tool=callgrind --callgrind-out-file="$work/cg" \
    --dump-before='*instruction_counts*measured*' \
    target/release/examples/instruction_counts >"$work/labels" 2>"$work/log"
python3 - "$work" "${1:-}" <<'PY'
import glob, os, statistics, sys
work, mode = sys.argv[1], sys.argv[2]
labels = [line.split() for line in open(os.path.join(work, "labels")) if line.strip()]
def total(path):
    for line in open(path):
        if line.startswith("summary:") or line.startswith("totals:"):
            return int(line.split()[1])
    raise SystemExit(f"no totals in {path}")
dumps = sorted(glob.glob(os.path.join(work, "cg.*")), key=lambda p: int(p.rsplit(".", 1)[1]))
# Dump 1 is the start-up; dump k + 1 holds the k-th region and the few instructions of the
# loop that leads to the next one (about 20, i.e. 0.2 per call at 100 calls).
counts = [total(p) for p in dumps][1:]
if len(counts) < len(labels):
    raise SystemExit(f"{len(counts)} dumps for {len(labels)} measurements")
rows = {}
for k, (op, regime, point, calls) in enumerate(labels):
    if op == "setup":
        continue
    per_call = counts[k] / int(calls)
    rows.setdefault((op, regime), []).append((point, per_call))
    if mode == "--all":
        print(f"{op:12} {regime:22} {point:>6} {per_call:10.1f}")
if mode != "--all":
    print(f"{'operation':12} {'regime':22} {'min':>8} {'median':>8} {'max':>8}  instructions per call")
    for (op, regime), values in rows.items():
        if op == "tabulated":
            for point, c in values:
                print(f"{op:12} {regime:22} {point + ' K':>8} {c:8.0f}")
            continue
        v = [c for _, c in values]
        print(f"{op:12} {regime:22} {min(v):8.0f} {statistics.median(v):8.0f} {max(v):8.0f}")
    for op in ("radiance", "inversion"):
        v = [c for (o, _), vals in rows.items() if o == op for _, c in vals]
        if v:
            print(f"{op:12} {'whole grid':22} {min(v):8.0f} {statistics.median(v):8.0f} {max(v):8.0f}")
PY
