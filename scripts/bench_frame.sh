#!/usr/bin/env bash
# Runs the 640x512 frame benchmarks of benches/frame.rs with short criterion settings
# (about 2 minutes) and prints, per case, criterion's median and the fastest sample as
# time per frame and Mpixel/s, with the ratio of each to the in-run u16 -> f32 widening
# floor. The fastest sample is the least disturbed by other processes on a shared machine.
# Usage: bash scripts/bench_frame.sh            (run, then summarise)
#        bash scripts/bench_frame.sh --summary  (summarise the last run only)
set -euo pipefail
cd "$(dirname "$0")/.."
if [ "${1:-}" != "--summary" ]; then
    cargo bench --bench frame -- 'frame_640x512/(widen|table_uniform_scene$|table_uniform_scene_parallel|table_emissivity_map|table_signal)' \
        --warm-up-time 1 --measurement-time 3 --noplot >/dev/null
fi
python3 - <<'PY'
import glob, json, os
root = "target/criterion/frame_640x512"
pixels = 640 * 512
def point(name):
    d = os.path.join(root, name, "new")
    est = json.load(open(os.path.join(d, "estimates.json")))
    sample = json.load(open(os.path.join(d, "sample.json")))
    per_iter = [t / n for t, n in zip(sample["times"], sample["iters"])]
    return est["median"]["point_estimate"], min(per_iter)
floor_med, floor_fast = point("widen_u16_to_f32_floor")
targets = {"table_uniform_scene": 800, "table_emissivity_map": 600, "table_signal_f32_uniform_scene": 800}
print(f"{'case':46} {'median us':>10} {'fastest us':>10} {'Mpixel/s (fastest)':>18} {'x floor':>8}  target")
cases = ["table_uniform_scene", "table_uniform_scene_parallel_2_threads",
         "table_uniform_scene_parallel_4_threads", "table_emissivity_map",
         "table_signal_f32_uniform_scene", "table_signal_f32_emissivity_map"]
for name in cases:
    if not os.path.isdir(os.path.join(root, name, "new")):
        continue
    med, fast = point(name)
    rate = pixels / fast * 1e3
    target = targets.get(name)
    verdict = "" if target is None else (f">= {target}: " + ("met" if rate >= target else "NOT met"))
    print(f"{name:46} {med / 1e3:10.1f} {fast / 1e3:10.1f} {rate:18.0f} {fast / floor_fast:8.1f}  {verdict}")
PY
