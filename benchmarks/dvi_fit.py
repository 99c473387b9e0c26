"""Synthesis and place and route of the DVI tops on ECP5, iCE40 and Gowin, with the open tools.

For each job of tests/link/dvi_jobs.py (640x480 from an ECP5-25F with 25 MHz, from an
iCE40 HX8K with 12 MHz, from a Gowin GW1NR-9 with 27 MHz), as tests/link/test_dvi_fit.py
runs it: the planned pixel (core) and serial clocks, nextpnr's constraint and Fmax for
each clock domain (PASS when the Fmax reaches the constraint), the LUT and flip-flop
cells of Yosys's stat, and the time of synthesis and of place and route.

    python benchmarks/dvi_fit.py

A benchmark, not a test: the figures go in the README.  The first Yosys call of a
fresh machine also compiles the WebAssembly build (about 30 s, FIELD-NOTES).
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))  # the tests' job table

from synccore.verification.pnr import Domain, Placed  # noqa: E402
from tests.link.dvi_jobs import JOBS, fit_dvi  # noqa: E402

# Yosys's cell types per family: logic (LUTs; carry cells apart) and flip-flops
LUT_PREFIX = {"ecp5": "LUT4", "ice40": "SB_LUT4", "gowin": "LUT"}
CARRY = {"ecp5": "CCU2C", "ice40": "SB_CARRY", "gowin": "ALU"}
FF_PREFIX = {"ecp5": "TRELLIS_FF", "ice40": "SB_DFF", "gowin": "DFF"}


def _domain(d: Domain | None, same_as: str = "") -> str:
    if same_as:
        return f"= {same_as}"
    if d is None:
        return "-"
    if d.achieved_mhz is None:
        return f"{d.constraint_mhz:.1f}: no fabric path"
    verdict = "PASS" if d.achieved_mhz >= d.constraint_mhz else "FAIL"
    return f"{d.achieved_mhz:.1f} @ {d.constraint_mhz:.1f} {verdict}"


def row(key: str, pixel: float, serial: float, placed: Placed) -> str:
    family = JOBS[key].part.family
    serial_dom = placed.domains.get("serial_clk")
    return (f"| {key} | {pixel:.3f} | {serial:.3f} "
            f"| {_domain(placed.domains.get('pixel_clk'))} "
            f"| {_domain(serial_dom, '' if serial_dom else 'pixel_clk (one net)')} "
            f"| {placed.count_prefixed(LUT_PREFIX[family])} | {placed.count(CARRY[family])} "
            f"| {placed.count_prefixed(FF_PREFIX[family])} "
            f"| {placed.synth_s:.1f} | {placed.pnr_s:.1f} |")  # fmt: skip


def main() -> None:
    print("| family | pixel clock planned (MHz) | serial clock planned (MHz) "
          "| pixel_clk Fmax @ constraint (MHz) | serial_clk Fmax @ constraint (MHz) "
          "| LUTs | carry cells | FFs | synth (s) | pnr (s) |")  # fmt: skip
    print("|---|---:|---:|---|---|---:|---:|---:|---:|---:|")
    for key, job in JOBS.items():
        with tempfile.TemporaryDirectory() as folder:
            plan, placed = fit_dvi(job, Path(folder))
        assert plan.core_hz is not None and plan.serial_hz is not None
        print(row(key, float(plan.core_hz) / 10**6, float(plan.serial_hz) / 10**6, placed))


if __name__ == "__main__":
    main()
