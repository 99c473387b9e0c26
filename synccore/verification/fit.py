"""Will it fit: the emitted core synthesised by Yosys and placed and routed by nextpnr.

:func:`fit` synthesises the core's Verilog for a part (:mod:`synccore.verification.parts`),
places and routes it with the core clock (pixel clock / pixels_per_clock) as nextpnr's
constraint, and reports Yosys's own cell counts (``stat -json``: LUTs, flip-flops, carry
cells) and nextpnr's own Fmax (its ``--report`` file) against the needed clock.  When the
clock is missed it names the smallest pixels_per_clock (2, 4, 8) whose core clock lies
below the Fmax found and that the spec's horizontal numbers divide by, and fits the core
again at that setting to show it.  ``top=True`` fits the first-light design instead
(:mod:`synccore.verification.fit_top`).

Results are kept under the synccore cache folder (``fit/<hash>``), keyed by the emitted
HDL text, the part, the mode and the installed tools' versions: a repeated call runs no
tool.  The bare core's pins are left to the placer (Gowin's placer places none: the
part's general-purpose pins are handed out in port order).
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import os
import shutil
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from synccore.emit import render_verilog
from synccore.errors import ToolError
from synccore.model import Timing
from synccore.spec import Spec
from synccore.verification.parts import Part
from synccore.verification.pnr import (
    INSTALL,
    Domain,
    ToolMissing,
    missing_tools,
    route,
    synthesise,
    versions,
)
from synccore.verification.simulate import cache_dir

LUT_PREFIX = {"ice40": "SB_LUT4", "ecp5": "LUT4", "gowin": "LUT"}
"""Yosys's LUT cell types of each family (by prefix; Gowin has LUT1..LUT4)."""
FF_PREFIX = {"ice40": "SB_DFF", "ecp5": "TRELLIS_FF", "gowin": "DFF"}
CARRY = {"ice40": "SB_CARRY", "ecp5": "CCU2C", "gowin": "ALU"}
PPC_CHOICES = (2, 4, 8)
RESULT = "fit.json"


@dataclass(frozen=True)
class ClockFit:
    """One clock domain: the clock it needs, nextpnr's constraint and its Fmax."""

    net: str
    needed_mhz: float
    constraint_mhz: float
    fmax_mhz: float | None  # None: nextpnr timed no path in the domain

    @property
    def met(self) -> bool:
        return self.fmax_mhz is None or self.fmax_mhz >= self.needed_mhz

    @property
    def margin_mhz(self) -> float | None:
        return None if self.fmax_mhz is None else self.fmax_mhz - self.needed_mhz

    @property
    def margin_pct(self) -> float | None:
        m = self.margin_mhz
        return None if m is None else 100 * m / self.needed_mhz


@dataclass(frozen=True)
class FitResult:
    """One design in one part: Yosys's cells, nextpnr's clocks, where its files are."""

    name: str  # the spec's name
    part: str  # the part's key
    part_name: str  # the vendor's name
    top: str  # the module fitted
    pixels_per_clock: int
    luts: int
    ffs: int
    carry: int
    cells: dict[str, int]  # Yosys stat of the top: cell type -> count
    clocks: tuple[ClockFit, ...]
    synth_s: float
    pnr_s: float
    folder: Path  # the netlist (synth.json), stat.json, report.json and pnr.log
    cached: bool = False

    @property
    def met(self) -> bool:
        return all(c.met for c in self.clocks)

    def to_dict(self) -> dict[str, object]:
        out = dataclasses.asdict(self)
        out["folder"] = str(self.folder)
        out["met"] = self.met
        out["clocks"] = [dict(dataclasses.asdict(c), met=c.met, margin_mhz=c.margin_mhz,
                              margin_pct=c.margin_pct) for c in self.clocks]  # fmt: skip
        return out


@dataclass(frozen=True)
class FitReport:
    """A fit, and when its clock was missed the pixels_per_clock that meets it, refitted."""

    result: FitResult
    suggested_ppc: int | None = None
    retry: FitResult | None = None
    note: str = ""  # why no pixels_per_clock is suggested, when the clock is missed

    def to_dict(self) -> dict[str, object]:
        return {"result": self.result.to_dict(), "suggested_pixels_per_clock": self.suggested_ppc,
                "retry": None if self.retry is None else self.retry.to_dict(),
                "note": self.note}  # fmt: skip


def _from_json(data: dict[str, object], folder: Path) -> FitResult:
    clocks = data.pop("clocks")
    assert isinstance(clocks, list)
    data.pop("met", None)
    data["folder"] = folder
    data["cached"] = True
    fits = tuple(ClockFit(**{k: c[k] for k in ("net", "needed_mhz", "constraint_mhz",
                                               "fmax_mhz")}) for c in clocks)  # fmt: skip
    return FitResult(clocks=fits, **data)  # type: ignore[arg-type]


def cache_key(texts: list[str], part: Part, mode: str, seed: int) -> str:
    """The hash naming a fit: the HDL texts, the part, the mode, the seed, the tools' versions."""
    digest = hashlib.sha256()
    for text in [*texts, part.key, mode, str(seed), versions(part.flow)]:
        digest.update(text.encode())
        digest.update(b"\0")
    return digest.hexdigest()[:24]


def cached_fit(key: str, part: Part, make: Callable[[Path], FitResult]) -> FitResult:
    """The fit stored under ``key``, else ``make`` it in a fresh folder and keep it."""
    folder = cache_dir() / "fit" / key
    stored = folder / RESULT
    if stored.is_file():
        return _from_json(json.loads(stored.read_text()), folder)
    missing = missing_tools(part.flow)
    if missing:
        raise ToolMissing(f"{' and '.join(missing)} not found: {INSTALL}")
    work = folder.with_name(f"{key}.tmp{os.getpid()}")
    shutil.rmtree(work, ignore_errors=True)
    work.mkdir(parents=True)
    result = make(work)
    (work / RESULT).write_text(json.dumps(dataclasses.replace(result, folder=folder).to_dict()))
    try:
        work.rename(folder)
    except OSError:  # another run stored it meanwhile
        shutil.rmtree(work, ignore_errors=True)
    return dataclasses.replace(result, folder=folder)


def cell_figures(part: Part, cells: dict[str, int]) -> tuple[int, int, int]:
    """LUTs, flip-flops and carry cells among Yosys's cells of a ``part``'s family."""
    family = part.family

    def prefixed(prefix: str) -> int:
        return sum(n for t, n in cells.items() if t.startswith(prefix))

    return prefixed(LUT_PREFIX[family]), prefixed(FF_PREFIX[family]), cells.get(CARRY[family], 0)


def clock_fit(domain: Domain, needed_hz: float) -> ClockFit:
    return ClockFit(net=domain.net, needed_mhz=needed_hz / 1e6,
                    constraint_mhz=domain.constraint_mhz, fmax_mhz=domain.achieved_mhz)  # fmt: skip


def _gowin_pins(part: Part, folder: Path, ports: dict[str, dict[str, object]], clk: str
                ) -> list[str]:  # fmt: skip
    """Gowin: a pin file giving every port bit a pin (the clock first); nextpnr's options."""
    bits = [clk] + [
        name if len(p["bits"]) == 1 else f"{name}[{i}]"  # type: ignore[arg-type]
        for name, p in ports.items() if name != clk
        for i in range(len(p["bits"]))  # type: ignore[arg-type]
    ]  # fmt: skip
    if len(bits) > len(part.pins):
        raise ToolError(f"the core has {len(bits)} port bits, more than the {len(part.pins)} "
                        f"general-purpose pins of {part.name}")  # fmt: skip
    lines = [f'IO_LOC "{b}" {pin};' for b, pin in zip(bits, part.pins, strict=False)]
    (folder / "pins.cst").write_text("\n".join(lines) + "\n")
    return ["--vopt", "cst=pins.cst"]


def _fit_core_in(spec: Spec, part: Part, folder: Path, seed: int) -> FitResult:
    text = render_verilog(spec)
    (folder / f"{spec.name}.v").write_text(text)
    start = time.monotonic()
    cells, top_json = synthesise(part.flow, folder, spec.name, [f"{spec.name}.v"])
    synth_s = time.monotonic() - start
    needed = float(Timing(spec).core_clock_hz)
    clk = spec.port_prefix + "clk"
    options = ["--freq", f"{needed / 1e6:.6f}"]
    if part.family == "gowin":
        ports = top_json["ports"]
        assert isinstance(ports, dict)
        options += _gowin_pins(part, folder, ports, clk)
    domains, _, pnr_s = route(part.flow, folder, clock_nets=[clk], options=options, seed=seed)
    luts, ffs, carry = cell_figures(part, cells)
    return FitResult(name=spec.name, part=part.key, part_name=part.name, top=spec.name,
                     pixels_per_clock=spec.core.pixels_per_clock, luts=luts, ffs=ffs,
                     carry=carry, cells=cells, clocks=(clock_fit(domains[clk], needed),),
                     synth_s=synth_s, pnr_s=pnr_s, folder=folder)  # fmt: skip


def fit_core(spec: Spec, part: Part, *, seed: int = 1) -> FitResult:
    """The bare core of ``spec`` in ``part`` (cached)."""
    key = cache_key([render_verilog(spec)], part, "core", seed)
    return cached_fit(key, part, lambda folder: _fit_core_in(spec, part, folder, seed))


def with_ppc(spec: Spec, ppc: int) -> Spec | None:
    """``spec`` at ``ppc`` pixels per clock, or None when a horizontal number does not divide."""
    h = spec.horizontal
    if any(n % ppc for n in (h.active, h.front_porch, h.sync, h.back_porch)):
        return None
    return dataclasses.replace(spec, core=dataclasses.replace(spec.core, pixels_per_clock=ppc))


def suggest_ppc(spec: Spec, fmax_mhz: float) -> tuple[int | None, str]:
    """The smallest pixels_per_clock above the spec's whose core clock lies below ``fmax_mhz``
    and that the horizontal numbers divide by; else None and why."""
    pixel_mhz = float(Timing(spec).pixel_clock_hz) / 1e6
    for ppc in PPC_CHOICES:
        if ppc <= spec.core.pixels_per_clock or pixel_mhz / ppc >= fmax_mhz:
            continue
        if with_ppc(spec, ppc) is not None:
            return ppc, ""
    return None, (f"no pixels_per_clock of {', '.join(map(str, PPC_CHOICES))} brings the "
                  f"core clock below {fmax_mhz:.1f} MHz with horizontal numbers that divide")
