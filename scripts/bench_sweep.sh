#!/usr/bin/env bash
# Runs benches/sweep.rs with short criterion settings (about 4 minutes) and prints, per
# regime, min / median / max over the temperatures of the time per call, with the ratio
# of each to the in-run baseline of its group. Two figures per point: criterion's median
# over samples (what a loaded machine gives) and the fastest sample (the least disturbed
# by other processes on a shared machine; closest to an idle machine).
# Usage: bash scripts/bench_sweep.sh [criterion filter]   (e.g. 'radiance_3-5um')
# Summary only, from the last run: bash scripts/bench_sweep.sh --summary
set -euo pipefail
cd "$(dirname "$0")/.."
if [ "${1:-}" != "--summary" ]; then
    cargo bench --bench sweep -- --warm-up-time 0.3 --measurement-time 1 --sample-size 30 \
        --noplot ${1:+"$1"} >/dev/null
fi
python3 - <<'PY'
import glob, json, os, statistics
root = "target/criterion"
def point(directory):
    est = json.load(open(os.path.join(directory, "new", "estimates.json")))
    sample = json.load(open(os.path.join(directory, "new", "sample.json")))
    per_iter = [t / n for t, n in zip(sample["times"], sample["iters"])]
    return est["median"]["point_estimate"], min(per_iter)
groups = sorted(d for d in glob.glob(os.path.join(root, "*")) if os.path.basename(d).startswith(("radiance_", "inversion_")))
targets = {"radiance": 60.0, "inversion": 200.0}
print(f"{'group':30} {'median of samples: min / median / max ns':42} {'fastest sample: min / median / max ns':40} {'ratio to baseline (fastest)':28} target")
for group in groups:
    name = os.path.basename(group)
    op = name.split("_", 1)[0]
    base_dirs = [d for d in glob.glob(os.path.join(group, "baseline_*")) if os.path.isdir(os.path.join(d, "new"))]
    points = [point(d) for d in glob.glob(os.path.join(group, "bandtemp", "*"))]
    if not points or not base_dirs:
        continue
    base_median, base_fast = point(base_dirs[0])
    med = [p[0] for p in points]
    fast = [p[1] for p in points]
    def trio(v):
        return f"{min(v):6.1f} / {statistics.median(v):6.1f} / {max(v):6.1f}"
    ratio = f"{min(fast) / base_fast:4.1f} / {statistics.median(fast) / base_fast:4.1f} / {max(fast) / base_fast:4.1f}"
    met = "met" if max(fast) <= targets[op] else "NOT met"
    print(f"{name:30} {trio(med):42} {trio(fast):40} {ratio:28} {met} (<= {targets[op]:.0f} ns, fastest sample)")
PY
