"""The Python API: read a timing, write its files, plan its clock, verify it.

Every function here is re-exported from :mod:`synccore`; docs/api.md shows
them at work; options are keyword-only.  The command line calls the same functions, so a
script and ``synccore build`` write the same files and meet the same errors:

* :class:`SpecError` for what a timing description says (every problem, located);
* :class:`ToolError` for what the machine or the board cannot do (one sentence);
* ``ValueError`` and ``TypeError`` for arguments a caller got wrong.
"""

from __future__ import annotations

from collections.abc import Sequence
from decimal import Decimal
from fractions import Fraction
from pathlib import Path

from synccore._version import __version__
from synccore.analog import DacDesign, design_dac
from synccore.clocking import advice
from synccore.clocking.link import LinkPlan, plan_link
from synccore.clocking.link_report import link_refusal
from synccore.clocking.modes import ModesPlan, plan_modes
from synccore.clocking.plan import ClockPlan, family_argument, frequency_argument, make_plan
from synccore.clocking.report import miss_text
from synccore.emit import render_verilog, render_vhdl
from synccore.emit.files import (
    board_artifacts,
    clock_artifacts,
    core_artifacts,
    dvi_artifacts,
    only_core,
    pattern_artifacts,
    testbench_artifacts,
    write_artifacts,
)
from synccore.errors import Location, Problem, SpecError, ToolError
from synccore.model import Outputs, Timing, timing
from synccore.model.pattern import PATTERNS, pattern_problems
from synccore.spec import Axis, CoreOptions, Spec
from synccore.spec.schema import json_schema
from synccore.timings import load, loads
from synccore.timings.modes import Mode, ModeLookupError, find
from synccore.units import hz
from synccore.verification.choosing import pick_engines
from synccore.verification.engines import Progress, Report
from synccore.verification.engines import verify as run_engines
from synccore.verification.fitting import fit
from synccore.verification.modes_verify import ModesReport, run_modes
from synccore.verification.prove import ProofResult, prove

__all__ = [
    "Axis", "ClockPlan", "CoreOptions", "DacDesign", "LinkPlan", "Location", "Mode", "ModesPlan",
    "ModesReport",
    "Outputs", "Problem", "ProofResult", "Report", "Spec", "SpecError", "Timing", "ToolError",
    "__version__",
    "adjusted_spec",
    "adjusted_text",
    "design_dac",
    "find_mode",
    "fit",
    "json_schema",
    "plan_dvi_link",
    "load",
    "loads",
    "plan_clock", "plan_modes",
    "prove",
    "render_verilog",
    "render_vhdl",
    "timing",
    "verify",
    "verify_modes",
    "write",
]


def write(
    spec: Spec,
    out_dir: str | Path,
    *,
    testbench: bool = False,
    pattern: str | None = None,
    clock: ClockPlan | None = None,
    link: LinkPlan | None = None,
    accept_clock_error: bool = False,
    accept_io_limit: bool = False,
    force: bool = False,
) -> list[Path]:
    """Write the files of ``spec`` into ``out_dir``, all of them or none; return their paths.

    Always the core, ``<name>.v`` and ``<name>.vhd`` (only it for a multi-mode spec).
    ``testbench=True`` adds the self-checking benches ``<name>_tb.v`` and ``<name>_tb.vhd``.
    ``pattern`` (``bars``, ``grid``, ``gradient``, ``checker``, ``edges``) adds the pattern
    generator and the first-light top level, ``<name>_pattern.*`` and ``<name>_top.*``.
    ``clock`` (a plan from :func:`plan_clock` for this spec) adds the PLL or
    clock-enable wrapper ``<name>_clock.v``/``.vhd`` and its SDC or XDC constraints; a
    plan that misses the tolerance (``clock.within_tolerance`` is false) is refused
    unless ``accept_clock_error=True``: apply its adjustment instead
    (:func:`adjusted_spec`, then plan and write that spec).
    ``pattern`` and ``clock`` together add the board top ``<name>_board.v``/``.vhd``
    (board clock pin, PLL or clock enable, reset synchroniser, first-light top, pins:
    it synthesises as it is), its pin file for the family to fill in (``.pcf``,
    ``.lpf``, ``.cst``, ``.xdc`` or ``.qsf``; none for the clock-enable route) and
    its timing constraints (``.sdc``; in the ``.xdc`` for the 7 series).

    ``link`` (a plan from :func:`plan_dvi_link`, with ``pattern``, without ``clock``) adds
    the DVI design (docs/dvi.md): encoder, link core, serialiser, link clocks, the top
    ``<name>_dvi``, constraints and pin file; refused outside the tolerance unless
    ``accept_clock_error=True``, beyond the family's I/O rating unless ``accept_io_limit=True``.

    The folder is created if missing.  An existing file is replaced only if synccore
    generated it, or with ``force=True``.

    Raises :class:`SpecError` with every problem when the spec cannot have what was asked
    (interlaced: no test benches, board top or DVI design yet; a minimum active area for the
    pattern; ``core.clock_enable`` for the clock-enable route and iCE40's link; a multi-mode
    spec: its core only) or a file may not be replaced; :class:`ToolError` for a plan with no
    setting, or refused as above; ``ValueError`` for an unknown pattern or a plan made for
    another spec.  Nothing is written when anything is raised.
    """
    only_core(spec, bool(testbench or pattern is not None or clock or link))
    _check_request(spec, testbench, pattern, clock, accept_clock_error, linked=link is not None)
    if link is not None:
        _check_link(spec, pattern, clock, link, accept_clock_error, accept_io_limit)
    artifacts = core_artifacts(spec)
    if testbench:
        artifacts += testbench_artifacts(spec)
    if pattern is not None:
        artifacts += pattern_artifacts(spec, pattern)
    if clock is not None:
        artifacts += clock_artifacts(clock)
    if clock is not None and pattern is not None:
        artifacts += board_artifacts(clock, pattern)
    if link is not None and pattern is not None:  # _check_link refused a link without one
        artifacts += dvi_artifacts(link, pattern)
    return write_artifacts(artifacts, out_dir, force=force)


def _check_link(spec: Spec, pattern: str | None, clock: ClockPlan | None, link: LinkPlan,
                accept_clock_error: bool, accept_io_limit: bool) -> None:  # fmt: skip
    """Raise what :func:`write` documents when ``link`` cannot be written for ``spec``."""
    if pattern is None or clock is not None:
        raise ValueError("a DVI link is written with a pattern and without a clock plan: "
                         "write(spec, out, pattern='bars', link=plan_dvi_link(...))")  # fmt: skip
    if link.spec != spec:
        raise ValueError(f"the link plan was made for the spec {link.spec.name!r} "
                         f"({link.spec.source}), not for this one ({spec.source})")  # fmt: skip
    if link.problems:
        raise SpecError(list(link.problems))
    why = link_refusal(link, accept_clock_error=accept_clock_error, accept_io_limit=accept_io_limit)
    if why is not None:
        raise ToolError(why)


def _check_request(spec: Spec, testbench: bool, pattern: str | None, clock: ClockPlan | None,
                   accept_clock_error: bool, *, linked: bool = False) -> None:  # fmt: skip
    """Raise what :func:`write` documents when ``spec`` cannot have the files asked for."""
    problems: list[Problem] = []
    if spec.interlaced and (testbench or (pattern is not None and (clock is not None or linked))):
        what = "the stand-alone test benches" if testbench else "the board top and DVI design"
        problems.append(Problem(spec.location("interlaced"), "interlaced",
                                f"{what} are progressive only so far: verify an interlaced "
                                "core with synccore verify, got true"))  # fmt: skip
    if pattern is not None:
        if pattern not in PATTERNS:
            raise ValueError(f"unknown pattern {pattern!r}; choose from {', '.join(PATTERNS)}")
        problems += pattern_problems(spec)
    if clock is not None:
        if clock.spec != spec:
            raise ValueError(f"the clock plan was made for the spec {clock.spec.name!r} "
                             f"({clock.spec.source}), not for this one ({spec.source})")  # fmt: skip
        _check_reached(clock)
        problems += _clock_enable_problems(clock)
    if problems:
        raise SpecError(problems)
    if clock is not None and not accept_clock_error:
        _check_tolerance(clock)


def _clock_enable_problems(plan: ClockPlan) -> list[Problem]:
    """The clock-enable route drives the core's ce input: the core must have one."""
    enable = plan.enable
    if plan.family is not None or enable is None or enable.divide == 1:
        return []
    if plan.spec.core.clock_enable:
        return []
    return [Problem(plan.spec.location("core.clock_enable"), "core.clock_enable",
                    f"must be true for the clock-enable route (ce every {enable.divide} "
                    f"cycles of {hz(plan.f_board)}), got false")]  # fmt: skip


def _check_tolerance(plan: ClockPlan) -> None:
    if plan.within_tolerance:
        return
    fix = ("apply its adjustment (synccore.adjusted_spec(plan)), plan that spec and write it"
           if plan.adjustment is not None else
           "no blanking adjustment brings it within tolerance: choose another board clock "
           "or family")  # fmt: skip
    raise ToolError(f"the clock plan misses: {miss_text(plan)}; {fix}, or pass "
                    "accept_clock_error=True")  # fmt: skip


def _check_reached(plan: ClockPlan) -> None:
    # The clock-enable route always has a setting (the nearest division); a PLL may have none.
    if plan.best is None and plan.family is not None:
        raise ToolError(f"no PLL setting of {plan.family.key} reaches {hz(plan.target)} "
                        f"from {hz(plan.f_board)}")  # fmt: skip


def verify(
    spec: Spec,
    *,
    engines: Sequence[str] | None = None,
    frames: int = 2,
    waves: bool = False,
    work_dir: str | Path | None = None,
    progress: Progress | None = None,
) -> Report:
    """Run the core of ``spec`` on each engine for ``frames`` frames and measure it.

    ``engines=None`` runs every simulator found (the built-in engine only when there is none);
    a list names them: ``icarus``, ``ghdl``, ``verilator``, ``builtin``.  The report's ``rows``
    compare each measured figure (totals, porches, sync widths and polarities, data enable,
    counters, frame and line strobes) with the timing model, one column per engine;
    ``report.ok`` is true when every engine ran and every figure matches, and
    ``report.problems()`` lists what did not.  A mismatch is a result, not an exception.

    ``waves=True`` keeps waveform files of each run (listed in ``report.runs``), under
    ``work_dir`` (default ``./<name>_verify``); without waves, runs go to a temporary folder
    unless ``work_dir`` is given.  ``progress`` is called with ``(engine, frames done)``.

    Raises :class:`ToolError` for an unknown engine or one that cannot run here, or a
    multi-mode spec (:func:`verify_modes` runs its switching bench); ``ValueError`` for fewer
    than 2 frames (a frame's figures are measured between two frame starts).
    """
    if spec.modes:
        raise ToolError("a multi-mode spec is verified by its switching bench: verify_modes")
    if isinstance(frames, bool) or not isinstance(frames, int) or frames < 2:
        raise ValueError(f"frames must be a whole number of at least 2, got {frames!r}")
    names = pick_engines(engines)
    return run_engines(spec, engines=names, frames=frames, waves=waves,
                       work_dir=Path(work_dir) if work_dir is not None else None,
                       progress=progress)  # fmt: skip


def verify_modes(spec: Spec, *, engines: Sequence[str] | None = None, changes: int | None = None,
                 seed: int = 1, work_dir: str | Path | None = None) -> ModesReport:  # fmt: skip
    """Verify a multi-mode spec's core: ``changes`` seeded mode changes (default 3; 1 on the
    built-in engine for modes over 20 000 cycles a frame) on each engine, as :func:`verify`
    picks them; every frame judged as a whole frame of the mode ``mode_active`` names, every
    change against the switching rule (docs/multimode.md).  ``report.ok``; ``report.problems()``
    in the benches' words; ``report.runs[engine].frames`` the frames measured.

    Raises :class:`ToolError` for an engine that cannot run here; ``ValueError`` for a
    single-mode spec (use :func:`verify`) or fewer than 1 change.
    """
    if not spec.modes:
        raise ValueError("verify_modes takes a multi-mode spec (modes:); verify a single timing "
                         "with verify")  # fmt: skip
    if changes is not None and (isinstance(changes, bool) or not isinstance(changes, int)
                                or changes < 1):  # fmt: skip
        raise ValueError(f"changes must be a whole number of at least 1, got {changes!r}")
    return run_modes(spec, pick_engines(engines), changes=changes, seed=seed,
                     work_dir=Path(work_dir) if work_dir is not None else None)  # fmt: skip


def plan_clock(
    spec: Spec,
    board_clock_hz: int | float | Fraction | Decimal | str,
    family: str | None,
    *,
    strict: bool = True,
) -> ClockPlan:
    """Plan the core clock of ``spec`` from the board's oscillator.

    ``board_clock_hz`` is a number in Hz or a string with a unit (``"12 MHz"``).
    ``family`` names the FPGA family whose PLL makes the clock (``ice40``,
    ``ecp5``, ``xc7-mmcm``, ``xc7-pll``, ``gowin``, ``cyclone``); ``None`` runs the
    core on the board clock with a clock enable instead.  The spec's own
    ``board`` section is not consulted: pass ``spec.board.clock_hz`` and
    ``spec.board.family`` to use it.

    The plan holds the best setting and the runners-up, the rates the display
    will see, and, when the best misses the monitors' tolerance, a horizontal
    total that would keep line rate and refresh on target.  Pass it to
    :func:`write` as ``clock`` to write the wrapper and constraints.

    Raises :class:`ToolError` for a board clock that is not a frequency above
    0 Hz, an unknown family, or (with ``strict=True``) when no setting of the
    family reaches the core clock; ``strict=False`` returns such a plan
    (``plan.best is None``) so that it can tell why.
    """
    plan = make_plan(spec, f_board=frequency_argument(board_clock_hz), family=family_argument(family))
    if strict:
        _check_reached(plan)
    return plan


def plan_dvi_link(
    spec: Spec, board_clock_hz: int | float | Fraction | Decimal | str, family: str | None
) -> LinkPlan:
    """Plan a DVI link's serial clock (5 x the pixel clock) and core clock from one PLL.

    Raises :class:`ToolError` for a board clock that is not a frequency, an unknown or
    missing family (the link needs a PLL), and :class:`SpecError` when the family cannot
    carry the spec's pixels_per_clock.  A plan that misses the tolerance or the I/O rating
    is returned as such (``plan.ok`` is False); ``plan.problems`` holds the spec changes
    the link still needs (iCE40: core.clock_enable), which
    :func:`synccore.clocking.link.link_problems` also gives.
    """
    f_board = frequency_argument(board_clock_hz)
    fam = family_argument(family)
    if fam is None:
        raise ToolError("a DVI link needs a PLL: name the FPGA family", subject="family")
    return plan_link(spec, f_board=f_board, family=fam)


def adjusted_spec(plan: ClockPlan) -> Spec:
    """The plan's spec with its adjustment applied: the porches it moved and the pixel clock
    the route reaches (to the nearest Hz); name, core options, ports, board and colour kept.

    Plan it again on the same board to write its files.  Raises :class:`ToolError` when the
    plan offers no adjustment (it is within tolerance, or no raster within the bounds helps);
    the message says which.
    """
    return advice.adjusted_spec(plan)


def adjusted_text(plan: ClockPlan, *, command: str | None = None) -> str:
    """:func:`adjusted_spec` as a complete, commented timing description (YAML text).

    The header gives the reason: the board clock and route, the error before and after,
    the tolerance assumed and its source, what moved within which bounds, and
    ``command`` (how to build it) when given.  :func:`loads` of the text gives
    :func:`adjusted_spec` back (with the same ``source``).  Raises :class:`ToolError`
    like :func:`adjusted_spec`.
    """
    return advice.adjusted_text(plan, command=command)


def find_mode(name: str) -> Mode:
    """The library's standard timing (VESA DMT or CTA-861) that ``name`` names.

    ``name`` is a mode (``"1280x720@60"``, ``"1920x1080@59.94"``, optionally
    followed by ``dmt``, ``cta``, ``rb`` or ``std``) or a source (``"DMT 55h"``,
    ``"CTA VIC 4"``).  Raises ``ValueError`` when it names no entry, or several
    entries whose timings differ.
    """
    if not isinstance(name, str):
        raise TypeError(f"name must be a string like '1280x720@60', got {name!r}")
    try:
        return find(name)
    except ModeLookupError as exc:
        raise ModeLookupError(f"name: {exc}, got {name!r}") from None
