"""A clock plan in words and as plain data: shared by the command line, JSON and file headers."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from synccore.clocking.adjust import Adjustment
from synccore.clocking.plan import ClockPlan, Route
from synccore.clocking.solve import TOLERANCE_SOURCE, EnableSetting, Setting
from synccore.spec import Spec
from synccore.units import fixed, hz, in_unit

__all__ = [
    "TOLERANCE_SOURCE", "adjustment_facts", "json_number", "miss_text", "percent_text",
    "plan_dict", "plan_facts", "ppm_text", "route_dict", "route_text", "tolerance_text",
]  # fmt: skip


def ppm_text(ppm: Fraction) -> str:
    """Signed parts per million, e.g. ``-1986.1 ppm``."""
    return f"{'+' if ppm > 0 else ''}{fixed(ppm, 1)} ppm"


def percent_text(share: Fraction) -> str:
    return f"{'+' if share > 0 else ''}{fixed(share * 100, 3)} %"


def route_text(r: Route) -> str:
    """One setting in one line: the dividers and the frequencies they give."""
    if isinstance(r, EnableSetting):
        if r.divide == 1:
            return f"board clock used as the core clock: {hz(r.f_out)}"
        return f"ce every {r.divide} cycles of {hz(r.f_board)} = {hz(r.f_out)}"
    params = " ".join(f"{k}={_number(v)}" for k, v in r.parameters().items())
    if r.family.ratio_params is not None:
        counters = " ".join(f"{k}={_number(v)}" for k, v in r.counters().items())
        params += f" (counters {counters})"
    return f"{params}  PFD {hz(r.f_pfd)}  VCO {hz(r.f_vco)}  out {hz(r.f_out)}"


def _number(v: int | Fraction) -> str:
    return str(v) if isinstance(v, int) else fixed(v, 3)


def plan_facts(plan: ClockPlan) -> list[tuple[str, str]]:
    """The plan's figures as (label, text) rows."""
    t = plan.timing
    rows = [("board clock", hz(plan.f_board))]
    if plan.family is None:
        rows.append(("route", "no PLL: the core runs on the board clock with a clock enable"))
    else:
        rows += [("family", plan.family.title), ("limits from", plan.family.document)]
    rows.append(("pixel clock wanted", hz(t.pixel_clock_hz)))
    if t.ppc > 1:
        rows.append(("core clock wanted", f"{hz(t.core_clock_hz)} (pixel clock / {t.ppc})"))
    rows.append(("serialiser clocks", f"TMDS bit clock x10 = {hz(t.pixel_clock_hz * 10)}, "
                                          f"DDR x5 = {hz(t.pixel_clock_hz * 5)}"))  # fmt: skip
    best = plan.best
    if best is None:
        rows.append(("setting", "none: " + _no_setting_reason(plan)))
        return rows
    rows.append(("setting", route_text(best)))
    if isinstance(best, EnableSetting) and best.f_board < plan.target * (1 - plan.tolerance):
        rows.append(("note", "the board clock is slower than the core clock: this needs a PLL"))
    px = plan.reached_pixel_hz
    assert px is not None and plan.line_rate_hz is not None and plan.refresh_hz is not None
    rows += [
        ("pixel clock reached", f"{hz(px)} ({ppm_text(best.ppm)}, {percent_text(best.error)})"),
        ("line rate", f"{in_unit(plan.line_rate_hz, 'kHz')} kHz "
                      f"(wanted {in_unit(t.line_rate_hz, 'kHz')} kHz)"),
        ("refresh", f"{fixed(plan.refresh_hz, 3)} Hz (wanted {fixed(t.refresh_hz, 3)} Hz)"),
        ("tolerance", f"{tolerance_text(plan)} on the pixel clock, {plan.tolerance_source}: "
                      + ("within" if abs(best.error) <= plan.tolerance else "OUTSIDE")),
    ]  # fmt: skip
    r = plan.clock_range
    if r is not None:
        rows.append(("datasheet clock", f"{hz(r.min)} to {hz(r.max)}: "
                                        + ("within" if plan.within_clock_range else "OUTSIDE")))
    return rows


def tolerance_text(plan: ClockPlan) -> str:
    """The tolerance as a signed band, e.g. ``+/-0.5 %``."""
    return f"+/-{fixed(plan.tolerance * 100, 3).rstrip('0').rstrip('.')} %"


def miss_text(plan: ClockPlan) -> str:
    """Why the plan misses, in one clause: the error, the tolerance and its source."""
    t = plan.timing
    best = plan.best
    if best is None:
        return f"no setting reaches the pixel clock {hz(t.pixel_clock_hz)}"
    px = plan.reached_pixel_hz
    assert px is not None
    text = (f"the clock reached, {hz(px)}, is {percent_text(best.error)} from the pixel clock "
            f"{hz(t.pixel_clock_hz)}")  # fmt: skip
    if abs(best.error) > plan.tolerance:
        return f"{text}, outside {tolerance_text(plan)}, {plan.tolerance_source}"
    r = plan.clock_range
    assert r is not None and not plan.within_clock_range
    return f"{text}, outside the datasheet's clock range {hz(r.min)} to {hz(r.max)}"


def _no_setting_reason(plan: ClockPlan) -> str:
    fam = plan.family
    assert fam is not None
    r = fam.input_range
    if not r.holds(plan.f_board):
        low = hz(r.low) if r.low is not None else "0 Hz"
        high = hz(r.high) if r.high is not None else "any"
        return f"the board clock is outside the {fam.primitive} input range {low} to {high}"
    return "no legal setting reaches the output range"


def _kept(spec: Spec, a: Adjustment) -> str:
    moved = a.moved(spec)
    if not any(m.endswith("back_porch") for m in moved):
        return ("back porches and sync widths kept: the picture keeps its position relative "
                "to the sync")  # fmt: skip
    shifts = [f"{label} by {getattr(a, label).back_porch - getattr(spec, label).back_porch:+d}"
              for label in ("horizontal", "vertical")
              if getattr(a, label).back_porch != getattr(spec, label).back_porch]  # fmt: skip
    return ("the front porches could not absorb the change alone: back porch moved "
            f"({', '.join(shifts)}), so the picture moves that far relative to the sync")


def _field_rows(spec: Spec, a: Adjustment) -> list[tuple[str, str]]:
    rows = []
    bounds = dict(a.bounds)
    for path in a.moved(spec):
        label, name = path.split(".")
        before = getattr(getattr(spec, label), name)
        after = getattr(getattr(a, label), name)
        b = bounds[path]
        rows.append((f"{label} {name.replace('_', ' ')}",
                     f"{before} -> {after} (may take {b.low} to {b.high}: {b.source})"))
    return rows


def adjustment_facts(plan: ClockPlan) -> list[tuple[str, str]]:
    """The suggested raster, when the plan offers one: what moves, and the rates it gives."""
    a = plan.adjustment
    if a is None:
        return []
    spec, t = plan.spec, plan.timing
    h, v = spec.horizontal, spec.vertical
    rows = [("horizontal total", f"{h.total} -> {a.h_total} pixels")]
    if a.v_total != v.total:
        rows.append(("vertical total", f"{v.total} -> {a.v_total} lines"))
    rows += _field_rows(spec, a)
    line = (f"{in_unit(a.line_rate_hz, 'kHz')} kHz ({percent_text(a.line_rate_error)} from "
            f"{in_unit(t.line_rate_hz, 'kHz')} kHz)")  # fmt: skip
    if not a.judges_line_rate:
        line += "; not judged: a panel fitted to its datasheet follows data enable"
    rows += [
        ("kept", _kept(spec, a)),
        ("pixel clock", f"{hz(a.pixel_clock_hz)} (the spec's {hz(t.pixel_clock_hz)})"),
        ("setting", route_text(a.route)),
        ("line rate", line),
        ("refresh", f"{fixed(a.refresh_hz, 3)} Hz ({percent_text(a.refresh_error)} from "
                    f"{fixed(t.refresh_hz, 3)} Hz)"),
        ("tolerance", f"{tolerance_text(plan)} on refresh"
                      + (" and line rate" if a.judges_line_rate else "")
                      + f", {plan.tolerance_source}: within"),
    ]  # fmt: skip
    return rows


def json_number(v: Fraction | int) -> int | float:
    f = Fraction(v)
    return int(f) if f.denominator == 1 else float(f)


def route_dict(r: Route) -> dict[str, Any]:
    if isinstance(r, EnableSetting):
        return {
            "route": "clock_enable",
            "divide": r.divide,
            "reached_hz": json_number(r.f_out),
            "error_ppm": round(float(r.ppm), 3),
        }
    assert isinstance(r, Setting)
    return {
        "route": "pll",
        "primitive": r.family.primitive,
        "parameters": {k: json_number(v) for k, v in r.parameters().items()},
        "counters": {k: json_number(v) for k, v in r.counters().items()},
        "pfd_hz": json_number(r.f_pfd),
        "vco_hz": json_number(r.f_vco),
        "reached_hz": json_number(r.f_out),
        "error_ppm": round(float(r.ppm), 3),
    }


def plan_dict(plan: ClockPlan) -> dict[str, Any]:
    """The plan as plain JSON-ready data (frequencies in Hz)."""
    t = plan.timing
    best = plan.best
    out: dict[str, Any] = {
        "spec": plan.spec.name,
        "family": plan.family.key if plan.family else None,
        "input_clock_hz": json_number(plan.f_board),
        "pixel_clock_hz": json_number(t.pixel_clock_hz),
        "pixels_per_clock": t.ppc,
        "core_clock_hz": json_number(t.core_clock_hz),
        "tolerance_ppm": json_number(plan.tolerance * 10**6),
        "tolerance_source": plan.tolerance_source,
        "best": None if best is None else route_dict(best),
        "runners_up": [route_dict(s) for s in plan.settings[1:]],
        "within_tolerance": plan.within_tolerance,
        "datasheet_clock_range_hz": None if plan.clock_range is None else [
            json_number(plan.clock_range.min), json_number(plan.clock_range.max)],
        "line_rate_hz": None if plan.line_rate_hz is None else json_number(plan.line_rate_hz),
        "refresh_hz": None if plan.refresh_hz is None else json_number(plan.refresh_hz),
        "wanted_refresh_hz": json_number(t.refresh_hz),
        "adjustment": None,
    }
    a = plan.adjustment
    if a is not None:
        out["adjustment"] = {
            "horizontal": vars(a.horizontal).copy(),
            "vertical": vars(a.vertical).copy(),
            "h_total": a.h_total,
            "v_total": a.v_total,
            "moved": list(a.moved(plan.spec)),
            "pixel_clock_hz": json_number(a.pixel_clock_hz),
            "setting": route_dict(a.route),
            "line_rate_hz": json_number(a.line_rate_hz),
            "refresh_hz": json_number(a.refresh_hz),
            "line_rate_error_ppm": round(float(a.line_rate_error * 10**6), 3),
            "refresh_error_ppm": round(float(a.refresh_error * 10**6), 3),
            "line_rate_judged": a.judges_line_rate,
        }
    return out
