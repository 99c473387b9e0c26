"""A plan for several modes in words and as plain data: the command line and JSON share it."""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from synccore.clocking.modes import RECONFIGURATION, ModesPlan
from synccore.clocking.plan import ClockPlan
from synccore.clocking.report import (
    json_number,
    percent_text,
    plan_dict,
    route_dict,
    route_text,
    tolerance_text,
)
from synccore.clocking.solve import EnableSetting, Route
from synccore.units import hz

__all__ = ["MODE_COLUMNS", "modes_dict", "modes_facts", "modes_table", "table_lines",
           "verdict_facts"]  # fmt: skip

MODE_COLUMNS = ("mode", "pixel clock wanted", "reached", "error", "divide", "tolerance", "within")


def _names(plan: ModesPlan) -> list[str]:
    """Each mode's name; the spec's source beside it where two modes share a name, the mode's
    number and size where they share the source too."""
    names = [s.name for s in plan.specs]
    named = [n if names.count(n) == 1 else f"{n} ({s.source})" for n, s in zip(names, plan.specs,
                                                                               strict=True)]
    # the modes of one multi-mode spec share name and source: their number and size tell them apart
    return [n if named.count(n) == 1 else
            f"{s.name} mode {i} ({s.horizontal.active}x{s.vertical.active})"
            for i, (n, s) in enumerate(zip(named, plan.specs, strict=True))]  # fmt: skip


def _route(plan: ModesPlan, index: int) -> Route | None:
    """What makes mode ``index``'s clock: the shared clock's divide, else its own route."""
    if plan.shared is not None:
        return plan.shared.enables[index]
    return plan.own(index)


def _divide(route: Route | None) -> str:
    if route is None:
        return "-"
    return str(route.divide) if isinstance(route, EnableSetting) else "1"


def _within(p: ClockPlan, route: Route | None) -> bool:
    if route is None or abs(route.error) > p.tolerance:
        return False
    r = p.clock_range
    return r is None or r.holds(route.f_out * p.timing.ppc)


def modes_table(plan: ModesPlan) -> list[tuple[str, ...]]:
    """One row per mode under :data:`MODE_COLUMNS`: wanted, reached, error, divide, verdict."""
    rows: list[tuple[str, ...]] = []
    for i, (name, p) in enumerate(zip(_names(plan), plan.plans, strict=True)):
        route = _route(plan, i)
        ppc = p.timing.ppc
        reached = "none" if route is None else hz(route.f_out * ppc)
        error = "-" if route is None else percent_text(route.error)
        rows.append((name, hz(p.timing.pixel_clock_hz), reached, error, _divide(route),
                     tolerance_text(p), "yes" if _within(p, route) else "NO"))  # fmt: skip
    return rows


def table_lines(header: tuple[str, ...], rows: list[tuple[str, ...]]) -> list[str]:
    """Rows as plain text columns, two spaces apart (never wrapped, so scripts can grep them)."""
    widths = [max(len(r[i]) for r in (header, *rows)) for i in range(len(header))]
    return ["  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)).rstrip()
            for r in (header, *rows)]  # fmt: skip


def modes_facts(plan: ModesPlan) -> list[tuple[str, str]]:
    """The board, the route and the limits searched, as (label, text) rows."""
    rows = [("board clock", hz(plan.f_board))]
    fam = plan.family
    if fam is None:
        rows.append(("route", "no PLL: the core runs on the board clock with a clock enable"))
    else:
        rows += [("family", fam.title), ("limits from", fam.document)]
        assert plan.max_core_clock is not None
        rows.append(("shared clock up to", f"{hz(plan.max_core_clock)} "
                                           f"({plan.max_core_clock_source})"))  # fmt: skip
    sources = {(tolerance_text(p), p.tolerance_source): None for p in plan.plans}
    rows += [("tolerance", f"{t} on the pixel clock, {s}") for t, s in sources]
    return rows


def _outside_names(plan: ModesPlan) -> str:
    return ", ".join(n for n, p in zip(_names(plan), plan.plans, strict=True)
                     if not p.within_tolerance)  # fmt: skip


def _common_facts(plan: ModesPlan) -> list[tuple[str, str]]:
    shared = plan.shared
    assert shared is not None
    if shared.setting is None:
        return [("verdict", "one configuration serves every mode: the board clock, "
                            "with each mode's clock-enable divide")]  # fmt: skip
    if plan.same_clock and set(shared.divides) == {1}:
        what = f"every mode wants the same core clock, {hz(plan.plans[0].target)}"
    else:
        what = (f"one PLL output, {hz(shared.f_clock)}, with each mode's clock-enable divide "
                f"(the core runs at {hz(shared.f_clock)} with its ce input)")  # fmt: skip
    return [("verdict", f"one PLL configuration serves every mode: {what}"),
            ("setting", route_text(shared.setting))]  # fmt: skip


def _fast_note(plan: ModesPlan) -> list[tuple[str, str]]:
    """A note when a PLL output runs the core faster than a mode's own clock (ce divide > 1)."""
    if plan.family is None:
        return []
    fast = [(r.f_board, name) for i, name in enumerate(_names(plan))
            if isinstance(r := _route(plan, i), EnableSetting) and r.divide > 1]  # fmt: skip
    top_mode = max(plan.plans, key=lambda p: p.target)
    if plan.shared is not None and plan.shared.f_clock <= top_mode.target * (1 + top_mode.tolerance):
        return []  # the fastest mode runs the core at this clock anyway
    if not fast:
        return []
    top = max(f for f, _ in fast)
    which = "every mode" if plan.shared is not None else ", ".join(n for _, n in fast)
    return [("note", f"the core runs at up to {hz(top)} ({which}): it must meet timing there in "
                     "your part (synccore fit reports Fmax; --max-core-clock bounds the search)")]


def _split_facts(plan: ModesPlan) -> list[tuple[str, str]]:
    fam = plan.family
    assert fam is not None and plan.max_core_clock is not None
    rows = [("verdict", f"no single PLL output up to {hz(plan.max_core_clock)} serves every mode "
                        "within its tolerance: each mode needs its own PLL setting, and switching "
                        "between them needs dynamic reconfiguration of the PLL (not emitted)"),
            ("reconfiguration", f"{fam.key}: {RECONFIGURATION[fam.key]}")]  # fmt: skip
    for i, name in enumerate(_names(plan)):
        setting, route = plan.own_setting(i), plan.own(i)
        text = "none" if setting is None else route_text(setting)
        if isinstance(route, EnableSetting):
            text += f", then ce every {route.divide} cycles"
        rows.append((f"setting {name}", text))
    return rows


def verdict_facts(plan: ModesPlan) -> list[tuple[str, str]]:
    """The verdict and what follows from it, as (label, text) rows."""
    if plan.verdict == "common":
        rows = _common_facts(plan)
    elif plan.verdict == "reconfigure":
        rows = _split_facts(plan)
    elif plan.family is None:
        rows = [("verdict", "no configuration serves every mode: the clock-enable route has one "
                            "clock, the board's, and it misses some modes' tolerance; name a "
                            "PLL family (--family) or adjust those modes' porches")]  # fmt: skip
    elif not plan.family.input_range.holds(plan.f_board):
        r = plan.family.input_range
        return [("verdict", f"no configuration: the board clock {hz(plan.f_board)} is outside the "
                            f"{plan.family.primitive} input range "
                            f"{hz(r.low or 0)} to {hz(r.high) if r.high else 'any'}")]
    else:
        rows = [("verdict", "no configuration serves every mode, and no PLL setting of "
                            f"{plan.family.key} reaches some modes within tolerance on its own")]
    rows += _fast_note(plan)
    if plan.verdict != "common" and plan.outside:
        rows.append(("outside alone", f"{_outside_names(plan)}: no route of its own is within "
                                      "tolerance; `synccore clock SPEC ... --write FILE` "
                                      "adjusts its porches"))  # fmt: skip
    if plan.needs_clock_enable:
        names = ", ".join(s.name for s in plan.needs_clock_enable)
        rows.append(("note", f"set core.clock_enable: true in {names} (a mode divided by more "
                             "than 1 advances on its ce input)"))  # fmt: skip
    return rows


def _mode_dict(plan: ModesPlan, index: int) -> dict[str, Any]:
    p = plan.plans[index]
    route = _route(plan, index)
    divide: int | None = route.divide if isinstance(route, EnableSetting) else None
    if route is not None and divide is None:
        divide = 1
    return {
        "spec": p.spec.name,
        "source": p.spec.source,
        "pixel_clock_hz": json_number(p.timing.pixel_clock_hz),
        "reached_pixel_hz": None if route is None else json_number(route.f_out * p.timing.ppc),
        "error_ppm": None if route is None else round(float(route.ppm), 3),
        "divide": divide,
        "tolerance_ppm": json_number(p.tolerance * 10**6),
        "within_tolerance": _within(p, route),
        "plan": plan_dict(p),
    }


def modes_dict(plan: ModesPlan) -> dict[str, Any]:
    """The plan as plain JSON-ready data (frequencies in Hz)."""
    shared = plan.shared
    limit: Fraction | None = plan.max_core_clock
    return {
        "board_clock_hz": json_number(plan.f_board),
        "family": plan.family.key if plan.family else None,
        "max_core_clock_hz": None if limit is None else json_number(limit),
        "max_core_clock_source": plan.max_core_clock_source or None,
        "verdict": plan.verdict,
        "same_clock": plan.same_clock,
        "shared": None if shared is None else {
            "clock_hz": json_number(shared.f_clock),
            "setting": None if shared.setting is None else route_dict(shared.setting),
            "divides": list(shared.divides),
        },
        "reconfiguration": (RECONFIGURATION[plan.family.key]
                            if plan.verdict == "reconfigure" and plan.family else None),
        "needs_clock_enable": [s.name for s in plan.needs_clock_enable],
        "modes": [_mode_dict(plan, i) for i in range(len(plan.plans))],
    }  # fmt: skip
