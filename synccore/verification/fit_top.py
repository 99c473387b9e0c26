"""Fit the first-light design: the board top with its PLL, or the DVI top, every clock domain.

The board top ``<name>_board`` (board clock pin, PLL, reset synchroniser, core, pattern)
is written for a clock plan from the board's oscillator, as ``synccore.write(...,
pattern="bars", clock=plan)`` writes it; the DVI top ``<name>_dvi`` as ``synccore.write(...,
pattern="bars", link=plan)``.  Their pin files are filled in with the part's board pins
(:mod:`synccore.verification.parts`); nextpnr-ice40 and -ecp5 derive the PLL's clocks from
the board clock's frequency in the pin file, nextpnr-himbaechel-gowin reads the SDC.
"""

from __future__ import annotations

import time
from fractions import Fraction
from pathlib import Path

from synccore.clocking import FAMILIES
from synccore.clocking.link import plan_link
from synccore.clocking.link_report import link_refusal
from synccore.clocking.plan import make_plan
from synccore.clocking.report import miss_text
from synccore.emit.files import (
    Artifact,
    board_artifacts,
    clock_artifacts,
    core_artifacts,
    dvi_artifacts,
    pattern_artifacts,
)
from synccore.errors import SpecError, ToolError
from synccore.spec import Spec, parse_frequency
from synccore.units import hz
from synccore.verification.fit import FitResult, cache_key, cached_fit, cell_figures, clock_fit
from synccore.verification.parts import Part
from synccore.verification.pnr import board_options, route, synthesise

PATTERN = "bars"
BOARD_SOURCES = ("", "_pattern", "_top", "_clock", "_board")
DVI_SOURCES = ("", "_pattern", "_top", "_tmds_encoder", "_tmds", "_serialiser", "_link_clock",
               "_dvi")  # fmt: skip
"""The Verilog files of each design (``<name><suffix>.v``), the top last."""


def _board_clock(spec: Spec, value: object) -> Fraction:
    f_board = parse_frequency(value) if value is not None else spec.board.clock_hz
    if f_board is None or f_board <= 0:
        raise ToolError("the first-light design needs the board's oscillator: give "
                        "--board-clock (board_clock_hz) or board.clock_hz in the spec",
                        subject="board_clock")  # fmt: skip
    return f_board


def _board_design(spec: Spec, part: Part, f_board: Fraction, accept: bool
                  ) -> tuple[list[Artifact], list[tuple[str, float]], tuple[str, ...]]:  # fmt: skip
    plan = make_plan(spec, f_board=f_board, family=FAMILIES[part.family])
    best = plan.best
    if best is None:
        raise ToolError(f"no PLL setting of {part.family} reaches {hz(plan.target)} "
                        f"from {hz(f_board)}")  # fmt: skip
    if not plan.within_tolerance and not accept:
        raise ToolError(f"the clock plan misses: {miss_text(plan)}; apply its adjustment "
                        "(synccore clock --write) or pass accept_clock_error=True "
                        "(--accept-clock-error)")  # fmt: skip
    arts = core_artifacts(spec) + pattern_artifacts(spec, PATTERN) + clock_artifacts(plan)
    arts += board_artifacts(plan, PATTERN)
    return arts, [("pixel_clk", float(best.f_out))], BOARD_SOURCES


def _dvi_design(spec: Spec, part: Part, f_board: Fraction, accept: bool
                ) -> tuple[list[Artifact], list[tuple[str, float]], tuple[str, ...]]:  # fmt: skip
    plan = plan_link(spec, f_board=f_board, family=part.family)
    if plan.problems:
        raise SpecError(list(plan.problems))
    why = link_refusal(plan, accept_clock_error=accept, accept_io_limit=False)
    if why is not None:
        raise ToolError(why.replace("accept_clock_error=True",
                                    "accept_clock_error=True (--accept-clock-error)"))
    assert plan.core_hz is not None and plan.serial_hz is not None
    arts = core_artifacts(spec) + pattern_artifacts(spec, PATTERN) + dvi_artifacts(plan, PATTERN)
    if part.family == "ice40":  # one net: the core runs on the serial clock with a ce
        return arts, [("pixel_clk", float(plan.serial_hz))], DVI_SOURCES
    clocks = [("pixel_clk", float(plan.core_hz)), ("serial_clk", float(plan.serial_hz))]
    return arts, clocks, DVI_SOURCES


def _fit_in(spec: Spec, part: Part, folder: Path, arts: list[Artifact],
            clocks: list[tuple[str, float]], sources: tuple[str, ...], dvi: bool,
            seed: int) -> FitResult:  # fmt: skip
    for art in arts:
        (folder / art.name).write_text(art.text)
    top = f"{spec.name}{sources[-1]}"
    start = time.monotonic()
    cells, _ = synthesise(part.flow, folder, top, [f"{spec.name}{s}.v" for s in sources])
    synth_s = time.monotonic() - start
    pins = part.dvi_pins if dvi else part.board_pins
    options = board_options(part.flow, folder, top, pins)
    domains, _, pnr_s = route(part.flow, folder, clock_nets=[n for n, _ in clocks],
                              options=options, seed=seed)  # fmt: skip
    luts, ffs, carry = cell_figures(part, cells)
    return FitResult(name=spec.name, part=part.key, part_name=part.name, top=top,
                     pixels_per_clock=spec.core.pixels_per_clock, luts=luts, ffs=ffs,
                     carry=carry, cells=cells,
                     clocks=tuple(clock_fit(domains[n], f) for n, f in clocks),
                     synth_s=synth_s, pnr_s=pnr_s, folder=folder)  # fmt: skip


def fit_top(spec: Spec, part: Part, *, link: str | None, board_clock_hz: object,
            accept_clock_error: bool = False, seed: int = 1) -> FitResult:  # fmt: skip
    """The first-light top of ``spec`` (``link="dvi"``: the DVI top) in ``part`` (cached)."""
    if link not in (None, "dvi"):
        raise ToolError(f"unknown link {link!r}; choose dvi", subject="link")
    f_board = _board_clock(spec, board_clock_hz)
    dvi = link == "dvi"
    design = _dvi_design if dvi else _board_design
    arts, clocks, sources = design(spec, part, f_board, accept_clock_error)
    texts = [a.name + "\n" + a.text for a in sorted(arts, key=lambda a: a.name)]
    key = cache_key(texts, part, "dvi" if dvi else "board", seed)
    return cached_fit(key, part, lambda folder: _fit_in(spec, part, folder, arts, clocks,
                                                        sources, dvi, seed))  # fmt: skip
