"""Synthesis and place and route of the three first-light jobs' board tops, with the open tools.

For each job (tests/first_light/jobs.py: 800x600 VGA from an iCE40 HX8K with 12 MHz,
a 1280x720 monitor from an ECP5-25k with 25 MHz, an 800x480 panel from a Gowin
GW1NR-9 with 27 MHz): the board top with the bars pattern through the Yosys wheel
and the family's nextpnr wheel, as tests/first_light/test_board_fit.py does.
Prints the pixel clock planned, the constraint nextpnr put on it (derived from
the PLL, or read from the SDC for Gowin), the achieved Fmax, and the time of
synthesis and of place and route.

    python benchmarks/first_light_fit.py

A benchmark, not a test: the figures go in the README.  The first Yosys call of a
fresh machine also compiles the WebAssembly build (about 30 s, FIELD-NOTES).
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))  # the tests' job table

from tests.first_light.fit import fit  # noqa: E402
from tests.first_light.jobs import JOBS  # noqa: E402


def main() -> None:
    print(f"{'job':<22} {'planned':>9} {'constraint':>11} {'how':>8} {'Fmax':>9} "
          f"{'synth':>7} {'pnr':>7}")  # fmt: skip
    for key, job in JOBS.items():
        with tempfile.TemporaryDirectory() as folder:
            f = fit(job, Path(folder))
        how = "derived" if f.derived_mhz is not None else "sdc"
        print(f"{key:<22} {f.planned_mhz:>5.2f} MHz {f.constraint_mhz:>7.2f} MHz {how:>8} "
              f"{f.achieved_mhz:>5.1f} MHz {f.synth_s:>6.1f}s {f.pnr_s:>6.1f}s")  # fmt: skip


if __name__ == "__main__":
    main()
