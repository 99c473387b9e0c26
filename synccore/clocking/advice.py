"""The plan's adjustment applied: the adjusted spec, and the same as a commented description.

:func:`adjusted_spec` is the input spec with the adjusted porches and the reached pixel
clock (to the nearest Hz, as a written file gives it back); its core options, port
prefix, board and colour are the input's.  :func:`adjusted_text` writes it through the
one YAML writer (:func:`synccore.timings.writing.spec_text`), with the reason in the
header: the board clock and route, the error before and after, the tolerance assumed
and its source.  Reading that text back gives :func:`adjusted_spec` again.
"""

from __future__ import annotations

import dataclasses
from pathlib import PurePath

from synccore.clocking.adjust import Adjustment
from synccore.clocking.plan import ClockPlan
from synccore.clocking.report import miss_text, percent_text, route_text, tolerance_text
from synccore.errors import ToolError
from synccore.spec import Spec
from synccore.timings.writing import spec_text, written_clock
from synccore.units import fixed, hz, in_unit


def no_adjustment_text(plan: ClockPlan) -> str:
    """Why ``plan`` offers no adjustment, in one sentence (nothing to adjust, or none found)."""
    if plan.within_tolerance:
        px = plan.reached_pixel_hz
        assert px is not None
        return (f"nothing to adjust: the clock reached, {hz(px)}, is within "
                f"{tolerance_text(plan)} of the pixel clock, {plan.tolerance_source}")  # fmt: skip
    judged = "refresh" if plan.spec.fit is not None else "refresh and line rate"
    where = "datasheet ranges" if plan.spec.fit is not None else "porch bounds"
    return (f"no adjustment: {miss_text(plan)}, and no raster within the {where} brings "
            f"{judged} within it; try another board clock or family")  # fmt: skip


def _adjustment(plan: ClockPlan) -> Adjustment:
    a = plan.adjustment
    if a is None:
        raise ToolError(no_adjustment_text(plan))
    return a


def adjusted_spec(plan: ClockPlan) -> Spec:
    """The plan's spec with its adjustment applied; :class:`ToolError` when it has none.

    The pixel clock is the one the route reaches, to the nearest Hz; the porches are the
    adjustment's.  Name, core options, port prefix, board, colour and source are the
    input spec's; the result is explicit (no origin, notes nor datasheet ranges), as the
    file :func:`adjusted_text` writes reads back.
    """
    a = _adjustment(plan)
    return dataclasses.replace(plan.spec, pixel_clock_hz=written_clock(a.pixel_clock_hz),
                               horizontal=a.horizontal, vertical=a.vertical, origin="",
                               notes=(), fit=None, locations={})  # fmt: skip


def _route_words(plan: ClockPlan) -> str:
    if plan.family is None:
        return "a clock enable (no PLL)"
    return f"the {plan.family.key} PLL ({plan.family.primitive})"


def _moves(plan: ClockPlan, a: Adjustment) -> list[str]:
    spec = plan.spec
    bounds = dict(a.bounds)
    lines = []
    for path in a.moved(spec):
        label, name = path.split(".")
        b = bounds[path]
        lines.append(f"  {path}: {getattr(getattr(spec, label), name)} -> "
                     f"{getattr(getattr(a, label), name)} (may take {b.low} to {b.high}: "
                     f"{b.source})")  # fmt: skip
    lines.append(f"  totals: {spec.horizontal.total} x {spec.vertical.total} -> "
                 f"{a.h_total} x {a.v_total}")  # fmt: skip
    return lines


def _ranges(plan: ClockPlan) -> list[str]:
    fit = plan.spec.fit
    if fit is None:
        return []
    shown = []
    for path, r in fit.ranges:
        if path == "pixel_clock_hz":
            shown.append(f"{path} {hz(r.min)} to {hz(r.max)}")
        else:
            shown.append(f"{path} {fixed(r.min, 0)} to {fixed(r.max, 0)}")
    return ["Datasheet ranges of the input spec, all kept: " + "; ".join(shown) + "."]


def adjusted_text(plan: ClockPlan, *, command: str | None = None) -> str:
    """:func:`adjusted_spec` as a complete, commented timing description.

    The header says where it came from and why: the input spec, the board clock and
    route, the error before and after, the tolerance and its source, what moved and
    within which bounds, and (``command``) how to build it.  :class:`ToolError` when the
    plan has no adjustment.
    """
    a = _adjustment(plan)
    spec, t = plan.spec, plan.timing
    source = PurePath(spec.source).name
    origin = f" ({spec.origin})" if spec.origin else ""
    kept = ("Back porches and sync widths kept: the picture keeps its position relative to "
            "the sync." if not any(m.endswith("back_porch") for m in a.moved(spec)) else
            "Back porch moved (the front porches could not absorb the change alone): the "
            "picture moves relative to the sync by as much.")  # fmt: skip
    line = (f"line rate {in_unit(a.line_rate_hz, 'kHz')} kHz "
            f"({percent_text(a.line_rate_error)} from {in_unit(t.line_rate_hz, 'kHz')} kHz"
            + ("" if a.judges_line_rate else ", not judged: a panel follows data enable")
            + ")")  # fmt: skip
    comments = [
        f"Timing description written by `synccore clock --write` from {source}{origin}.",
        f"Adjusted for a {hz(plan.f_board)} board clock through {_route_words(plan)}:",
        f"  before: {miss_text(plan)}.",
        f"  after: {hz(a.pixel_clock_hz)} ({route_text(a.route)}),",
        f"  {line},",
        f"  refresh {fixed(a.refresh_hz, 3)} Hz ({percent_text(a.refresh_error)} from "
        f"{fixed(t.refresh_hz, 3)} Hz),",
        f"  within {tolerance_text(plan)}, {plan.tolerance_source}.",
        "Moved:",
        *_moves(plan, a),
        kept,
        *_ranges(plan),
    ]
    if command is not None:
        comments.append(f"Build it with: {command}")
    return spec_text(adjusted_spec(plan), comments=comments)
