"""One first-light job's board top through synthesis and place-and-route (the Yosys/nextpnr wheels).

:func:`fit` writes the job's board top and runs it through the package's
:func:`synccore.verification.pnr.place_and_route` (the one implementation, also behind
``synccore fit``): Yosys (the family's ``synth_*``, then ``stat -json`` of the flattened
top), then nextpnr, whose report and log give each clock net's constraint (derived from
a PLL, or read from a pin file or the SDC) and the Fmax it reached.

nextpnr-ice40 and nextpnr-ecp5 are given only the board clock's frequency, from the
pin file, and derive the PLL's output clocks from it; nextpnr-himbaechel-gowin (0.11)
derives no rPLL output (measured: the pixel clock falls back to its default 12 MHz),
so it reads the top's whole SDC, whose net lines constrain the PLL's clocks.  The
wheels see only the working folder, so every path is relative to it (FIELD-NOTES).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import synccore
from synccore.verification.pnr import Flow, board_options, place_and_route
from tests.first_light.jobs import Job, plan_of


@dataclass(frozen=True)
class Fit:
    planned_mhz: float  # the pixel clock the plan reaches
    derived_mhz: float | None  # what nextpnr derived for the PLL's output net (None: not derived)
    derived_net: str
    constraint_mhz: float  # nextpnr's constraint on the pixel clock domain
    achieved_mhz: float  # nextpnr's achieved Fmax on it
    synth_s: float
    pnr_s: float
    files: tuple[str, ...]
    netnames: frozenset[str]  # nets of the synthesised design


def _derived_mhz(log: str, net: str) -> float | None:
    found = re.search(rf"Derived frequency constraint of ([0-9.]+) MHz for net {net}\s", log)
    return None if found is None else float(found.group(1))


def fit(job: Job, folder: Path, *, pattern: str = "bars") -> Fit:
    """Write, synthesise and place and route ``job``'s board top in ``folder``; nextpnr's
    figures on the pixel clock.  The pin file gets the board clock's pin, then
    ``job.other_pins`` in turn; the placer chooses the rest."""
    plan = plan_of(job)
    spec = plan.spec
    best = plan.best
    assert best is not None
    written = synccore.write(spec, folder, pattern=pattern, clock=plan)
    board = f"{spec.name}_board"
    sources = [f"{spec.name}.v", f"{spec.name}_pattern.v", f"{spec.name}_top.v",
               f"{spec.name}_clock.v", f"{board}.v"]  # fmt: skip
    flow = Flow(job.family, job.synth, job.pnr, job.device)
    options = board_options(flow, folder, board, [job.clock_pin, *job.other_pins])
    placed = place_and_route(flow, folder, top=board, sources=sources, options=options,
                             clock_nets=["pixel_clk"])  # fmt: skip
    pixel = placed.domains["pixel_clk"]
    if pixel.achieved_mhz is None:
        raise AssertionError("no Fmax for the pixel clock in nextpnr's report")
    return Fit(
        planned_mhz=float(best.f_out) / 10**6,
        derived_mhz=_derived_mhz(placed.log, "pixel_clk"),
        derived_net="pixel_clk",
        constraint_mhz=pixel.constraint_mhz,
        achieved_mhz=pixel.achieved_mhz,
        synth_s=placed.synth_s,
        pnr_s=placed.pnr_s,
        files=tuple(p.name for p in written),
        netnames=placed.netnames,
    )
