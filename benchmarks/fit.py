"""Core quality: the emitted core beside a textbook counter and the flip-flop bound, per part.

For 640x480, 1280x720, 1920x1080 and 3840x2160 (CTA-861 VIC 1, 4, 16, 97 from the
library) at 1 and 4 pixels per clock (skipping a setting the horizontal numbers do not
divide by), on iCE40 HX8K and ECP5-25k: our core's LUTs, flip-flops, carry cells and
Fmax (``synccore.fit``: Yosys's stat, nextpnr's report, seed 1) beside the textbook
counter of tests/verification/textbook.py (comparators on the counters, combinational
outputs) placed at the same clock, and the flip-flop lower bound (the two counters plus
one per registered output bit).  Then the issue's goals, each with PASS or FAIL.

    python benchmarks/fit.py

A benchmark, not a test.  Fmax moves by some 10 % with nextpnr's seed.
"""

from __future__ import annotations

import dataclasses
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))  # the textbook counter

import synccore  # noqa: E402
from synccore.spec import Spec  # noqa: E402
from synccore.verification.fit import FitResult, cell_figures, with_ppc  # noqa: E402
from synccore.verification.parts import find_part  # noqa: E402
from synccore.verification.pnr import route, synthesise  # noqa: E402
from tests.verification.textbook import ff_bound, textbook_verilog  # noqa: E402

MODES = {"640x480": "CTA VIC 1", "1280x720": "CTA VIC 4", "1920x1080": "CTA VIC 16",
         "3840x2160": "CTA VIC 97"}  # fmt: skip
PARTS = ("ice40-hx8k", "ecp5-25k")


def spec_of(size: str, ppc: int) -> Spec | None:
    spec = synccore.loads(f'name: vid\nstandard: "{MODES[size]}"\n')
    return with_ppc(spec, ppc)


def textbook(spec: Spec, part: str, mhz: float) -> tuple[int, int, int, float | None]:
    chosen = find_part(part)
    with tempfile.TemporaryDirectory() as name:
        folder = Path(name)
        (folder / "textbook.v").write_text(textbook_verilog(spec))
        cells, _ = synthesise(chosen.flow, folder, "textbook", ["textbook.v"])
        domains, _, _ = route(chosen.flow, folder, clock_nets=["clk"],
                              options=["--freq", f"{mhz:.6f}"])  # fmt: skip
    luts, ffs, carry = cell_figures(chosen, cells)
    return luts, ffs, carry, domains["clk"].achieved_mhz


def row(size: str, ppc: int, part: str, spec: Spec) -> tuple[str, list[bool]]:
    ours: FitResult = synccore.fit(spec, part, suggest=False).result
    clock = ours.clocks[0]
    assert clock.fmax_mhz is not None
    t_luts, t_ffs, t_carry, t_fmax = textbook(spec, part, clock.needed_mhz)
    bound = ff_bound(spec)
    goals = [ours.luts <= t_luts, t_fmax is None or clock.fmax_mhz >= t_fmax,
             ours.ffs <= 1.2 * bound]  # fmt: skip
    text = (f"| {size} | {ppc} | {part} | {clock.needed_mhz:.3f} | {ours.luts} / {ours.ffs} / "
            f"{ours.carry} | {clock.fmax_mhz:.1f} {'met' if clock.met else 'MISSED'} | "
            f"{t_luts} / {t_ffs} / {t_carry} | {t_fmax:.1f} | {bound} | "
            + " ".join("PASS" if g else "FAIL" for g in goals) + " |")  # fmt: skip
    return text, goals


def closes(size: str, ppc: int, part: str) -> str:
    spec = spec_of(size, ppc)
    assert spec is not None
    r = synccore.fit(spec, part, suggest=False).result
    c = r.clocks[0]
    return (f"- {size} at {float(spec.pixel_clock_hz) / 1e6:.2f} MHz, {part}, ppc {ppc}: "
            f"Fmax {c.fmax_mhz:.1f} MHz for {c.needed_mhz:.3f} MHz: "
            f"{'PASS' if c.met else 'FAIL'}")  # fmt: skip


def main() -> None:
    print("| mode | ppc | part | core clock (MHz) | ours LUT / FF / carry | ours Fmax (MHz) "
          "| textbook LUT / FF / carry | textbook Fmax (MHz) | FF bound "
          "| goals: LUTs <= textbook, Fmax >= textbook, FFs <= 1.2 x bound |")  # fmt: skip
    print("|---|---:|---|---:|---|---|---|---:|---:|---|")
    tally = [0, 0, 0]
    rows = 0
    for size in MODES:
        for ppc in (1, 4):
            spec = spec_of(size, ppc)
            if spec is None:
                print(f"| {size} | {ppc} | - | horizontal numbers do not divide by {ppc} |||||||")
                continue
            for part in PARTS:
                text, goals = row(size, ppc, part, dataclasses.replace(spec))
                print(text, flush=True)
                rows += 1
                tally = [t + g for t, g in zip(tally, goals, strict=True)]
    names = ("LUTs <= textbook", "Fmax >= textbook", "FFs <= 1.2 x bound")
    print()
    for name, held in zip(names, tally, strict=True):
        print(f"- {name}: holds in {held} of {rows} rows")
    print(closes("1920x1080", 1, "ecp5-25k"))
    print(closes("1920x1080", 2, "ice40-hx8k"))
    print(closes("3840x2160", 4, "ecp5-25k"))


if __name__ == "__main__":
    main()
