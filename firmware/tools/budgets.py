#!/usr/bin/env python3
"""Turns the raw outputs of `scripts/firmware.sh measure` into the budget table.

Inputs (in the directory given): flash.txt ("level text_O3 text_Os" per line), and for
each build variant V in O3, Os: measure-V.txt (the firmware's "measure NAME CALLS STACK"
lines, in order) and measure-V.log (the QEMU plugin's "mark COUNT" lines, two per
measured region, same order). The first region is empty; its count (the marks' own
instructions) is subtracted from every other. Prints a Markdown table to stdout.
"""
import re
import sys
from pathlib import Path

KIB = 1024.0
# The targets (firmware budgets of the project).
FLASH_TARGET_KIB = 40.0
PIXEL_TARGET = 40.0
PIXEL_MAP_TARGET = 60.0
STACK_TARGET = 2048
STARTUP_TARGET = 50e6


def regions(out_dir, variant):
    lines = (out_dir / f"measure-{variant}.txt").read_text().splitlines()
    marks = [int(m) for m in re.findall(r"^mark (\d+)$",
                                        (out_dir / f"measure-{variant}.log").read_text(), re.M)]
    measured = [l.split() for l in lines if l.startswith("measure ")]
    if len(marks) != 2 * len(measured):
        sys.exit(f"budgets: {len(marks)} marks for {len(measured)} regions ({variant})")
    if "failures 0" not in lines:
        sys.exit(f"budgets: the measuring firmware reported failures ({variant})")
    result = {}
    overhead = None
    for k, (_, name, calls, stack) in enumerate(measured):
        count = marks[2 * k + 1] - marks[2 * k]
        if overhead is None:
            overhead = count
            continue
        result[name] = ((count - overhead) / int(calls), int(stack))
    return result


def main():
    out_dir = Path(sys.argv[1])
    flash = [l.split() for l in (out_dir / "flash.txt").read_text().splitlines() if l.strip()]
    variants = {v: regions(out_dir, v) for v in ("O3", "Os")}
    o3, os_ = variants["O3"], variants["Os"]

    def pixel(r, suffix=""):
        small = r[f"bt_frame_convert_counts(64px{suffix})"][0]
        full = r[f"bt_frame_convert_counts(3072px{suffix})"][0]
        per_pixel = (full - small) / (3072 - 64)
        return per_pixel, small - 64 * per_pixel

    def startup(r):
        return (r["bt_frame_table_rows_band(8-14um,250-1200K,1mK)"][0]
                + r["bt_frame_converter_new_band(8-14um,250-1200K,1mK)"][0])

    print("Measured by `scripts/firmware.sh measure` on QEMU MPS2 AN386 (Cortex-M4F), "
          "C library built `--no-default-features` for thumbv7em-none-eabihf "
          "(LTO, codegen-units 1), C at -O2, `--gc-sections`.")
    print()
    print("| flash (.text of the C example) | opt-level 3 | opt-level s | target |")
    print("| --- | ---: | ---: | ---: |")
    names = {"1": "band radiance + inversion", "2": "+ scene (measurement equation)",
             "3": "+ Sakuma-Hattori + frames"}
    for level, text_o3, text_os in flash:
        target = f"<= {FLASH_TARGET_KIB:.0f} KiB" if level == "3" else ""
        print(f"| {names[level]} | {int(text_o3) / KIB:.1f} KiB | {int(text_os) / KIB:.1f} KiB "
              f"| {target} |")
    print()
    print("| call (M4F) | instructions, opt 3 | instructions, opt s | stack, opt 3 | "
          "stack, opt s |")
    print("| --- | ---: | ---: | ---: | ---: |")
    for name, (count, stack) in o3.items():
        count_s, stack_s = os_[name]
        print(f"| `{name}` | {count:,.0f} | {count_s:,.0f} | {stack:,} B | {stack_s:,} B |")
    print()
    p, call = pixel(o3)
    pm, callm = pixel(o3, ",emissivity-map")
    ps, _ = pixel(os_)
    pms, _ = pixel(os_, ",emissivity-map")
    s3, ss = startup(o3), startup(os_)
    stack3 = max(v[1] for v in o3.values())
    stacks = max(v[1] for v in os_.values())
    worst3 = max(o3, key=lambda n: o3[n][1])
    flash3 = int(flash[-1][1]) / KIB
    flashs = int(flash[-1][2]) / KIB
    print("| budget | opt-level 3 | opt-level s | target | reached (opt 3) |")
    print("| --- | ---: | ---: | ---: | --- |")
    print(f"| flash, all levels | {flash3:.1f} KiB | {flashs:.1f} KiB | <= 40 KiB | "
          f"{'yes' if flash3 <= FLASH_TARGET_KIB else f'no, {flash3 / FLASH_TARGET_KIB:.2f}x'} |")
    print(f"| frame pixel | {p:.1f} | {ps:.1f} | <= 40 | "
          f"{'yes' if p <= PIXEL_TARGET else f'no, {p / PIXEL_TARGET:.2f}x'} |")
    print(f"| frame pixel, emissivity map | {pm:.1f} | {pms:.1f} | <= 60 | "
          f"{'yes' if pm <= PIXEL_MAP_TARGET else f'no, {pm / PIXEL_MAP_TARGET:.2f}x'} |")
    print(f"| frame call overhead | {call:,.0f} | | | |")
    print(f"| stack, deepest call | {stack3:,} B | {stacks:,} B | <= 2,048 B | "
          f"{'yes' if stack3 <= STACK_TARGET else f'no: `{worst3}`'} |")
    print(f"| start-up, 1 mK 8-14 um 250-1200 K table | {s3 / 1e6:.1f} M | {ss / 1e6:.1f} M | "
          f"<= 50 M | {'yes' if s3 <= STARTUP_TARGET else f'no, {s3 / STARTUP_TARGET:.1f}x'} |")


if __name__ == "__main__":
    main()
