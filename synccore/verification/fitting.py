"""``synccore fit``'s entry: the bare core (with a pixels_per_clock suggestion when it misses
its clock) or the first-light design's top, by part name."""

from __future__ import annotations

from synccore.spec import Spec
from synccore.verification.fit import FitReport, fit_core, suggest_ppc, with_ppc
from synccore.verification.fit_top import fit_top
from synccore.verification.parts import find_part


def fit(spec: Spec, part: str, *, top: bool = False, link: str | None = None,
        board_clock_hz: object = None, accept_clock_error: bool = False, suggest: bool = True,
        seed: int = 1) -> FitReport:  # fmt: skip
    """Synthesise and place and route ``spec``'s core (or, ``top=True``, its first-light
    design) in ``part``; Yosys's LUTs, flip-flops and carry cells, nextpnr's Fmax per clock.

    ``part`` is a key (``ice40-hx8k``, ``ice40-up5k``, ``ecp5-25k``, ``gw1nr-9``) or a
    vendor's spelling (``LFE5U-25F``, ``iCE40HX8K``...).  With ``top=True`` the board top
    ``<name>_board`` (PLL from ``board_clock_hz``, default the spec's ``board.clock_hz``)
    or, ``link="dvi"``, the DVI top ``<name>_dvi`` is fitted, each clock domain against
    its plan; a plan outside the monitors' tolerance is refused unless
    ``accept_clock_error=True``, as :func:`synccore.write` does.  When the bare core
    misses its clock (and ``suggest``), the report names the pixels_per_clock that would
    meet it and holds the fit at that setting.
    Raises :class:`ToolError` for an unknown part, a missing wheel or a failing tool.
    """
    chosen = find_part(part)
    if top or link is not None:
        return FitReport(fit_top(spec, chosen, link=link, board_clock_hz=board_clock_hz,
                                 accept_clock_error=accept_clock_error, seed=seed))  # fmt: skip
    result = fit_core(spec, chosen, seed=seed)
    clock = result.clocks[0]
    if result.met or not suggest or clock.fmax_mhz is None:
        return FitReport(result)
    ppc, note = suggest_ppc(spec, clock.fmax_mhz)
    if ppc is None:
        return FitReport(result, note=note)
    wider = with_ppc(spec, ppc)
    assert wider is not None
    return FitReport(result, suggested_ppc=ppc, retry=fit_core(wider, chosen, seed=seed))
