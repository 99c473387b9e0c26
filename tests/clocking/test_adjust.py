"""The porch adjustment: inside the datasheet, back porch and sync kept when they can be, honest rates.

Property tests over random datasheet ranges (panels fitted with ``fit:``) and random
explicit timings (monitors), each planned from random board clocks through the
clock-enable route and the PLLs of several families.  For the clock-enable route an
independent brute force over every division and every front porch pair says whether
the front porches alone could land within the tolerance, and how close anything can.
"""

from __future__ import annotations

import dataclasses
import math
from fractions import Fraction

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from synccore import SpecError, loads
from synccore.clocking import FAMILIES, Setting
from synccore.clocking.adjust import GOOD_ENOUGH
from synccore.clocking.plan import ClockPlan, make_plan
from synccore.spec import Fit

MHZ = 10**6
TOLERANCE = Fraction(5, 1000)  # VESA DMT, ±0.5 % on the pixel clock (from memory)
# Gowin's rPLL has the finest steps, so it lands inside datasheet ranges most often
FAMILY_CHOICES = (None, "gowin", "gowin", "ecp5", "ice40")

PROPERTY = settings(max_examples=30, deadline=None,
                    suppress_health_check=[HealthCheck.filter_too_much, HealthCheck.too_slow])


# ------------------------------------------------------------------ strategies


@st.composite
def ranged(draw: st.DrawFn, low: int, high: int, span: int) -> tuple[int, int, int]:
    lo = draw(st.integers(low, high))
    hi = lo + draw(st.integers(0, span))
    return lo, draw(st.integers(lo, hi)), hi


def _range_yaml(r: tuple[int, int, int]) -> str:
    return f"{{min: {r[0]}, typ: {r[1]}, max: {r[2]}}}"


@st.composite
def panels(draw: st.DrawFn) -> str:
    """A panel description with datasheet ranges and a fit: target (its typical refresh)."""
    h_active = draw(st.sampled_from([320, 480, 640, 800]))
    v_active = draw(st.sampled_from([240, 272, 480]))
    h = {k: draw(ranged(*a)) for k, a in
         (("front_porch", (1, 60, 80)), ("sync", (1, 40, 20)), ("back_porch", (1, 60, 40)))}
    v = {k: draw(ranged(*a)) for k, a in
         (("front_porch", (1, 20, 30)), ("sync", (1, 10, 5)), ("back_porch", (1, 30, 10)))}
    # leave some values fixed by the datasheet (one number instead of a range)
    fixed_h = draw(st.sampled_from(["", "back_porch", "sync"]))
    clock_lo = draw(st.integers(8_000, 40_000)) * 1000
    clock_hi = clock_lo + draw(st.integers(0, 15_000)) * 1000
    clock_typ = draw(st.integers(clock_lo // 1000, clock_hi // 1000)) * 1000
    fit = draw(st.sampled_from(["fit: {}\n", "fit: {tolerance_percent: 1}\n"]))

    def axis(label: str, active: int, parts: dict[str, tuple[int, int, int]], fixed: str) -> str:
        lines = [f"{label}:", f"  active: {active}"]
        for k, r in parts.items():
            lines.append(f"  {k}: {r[1] if k == fixed else _range_yaml(r)}")
        return "\n".join(lines + ["  sync_polarity: negative"]) + "\n"

    return (f"name: panel\npixel_clock_hz: {{min: {clock_lo}, typ: {clock_typ}, max: {clock_hi}}}\n"
            + axis("horizontal", h_active, h, fixed_h) + axis("vertical", v_active, v, "") + fit)


@st.composite
def monitors(draw: st.DrawFn) -> str:
    """An explicit timing (no datasheet ranges), optionally at 2 pixels per clock."""
    ppc = draw(st.sampled_from([1, 2]))
    h = [draw(st.integers(lo, hi)) * ppc for lo, hi in ((160, 400), (1, 40), (4, 60), (4, 80))]
    v = [draw(st.integers(lo, hi)) for lo, hi in ((200, 600), (1, 20), (1, 6), (5, 35))]
    clock = draw(st.integers(8_000, 60_000)) * 1000
    return (f"name: mon\npixel_clock_hz: {clock}\ncore: {{pixels_per_clock: {ppc}}}\n"
            f"horizontal: {{active: {h[0]}, front_porch: {h[1]}, sync: {h[2]}, "
            f"back_porch: {h[3]}, sync_polarity: negative}}\n"
            f"vertical: {{active: {v[0]}, front_porch: {v[1]}, sync: {v[2]}, "
            f"back_porch: {v[3]}, sync_polarity: positive}}\n")


boards = st.integers(10, 120).map(lambda m: Fraction(m * MHZ))


def _plan(text: str, board: Fraction, key: str | None) -> ClockPlan:
    try:
        spec = loads(text)
    except SpecError:
        assume(False)
        raise
    return make_plan(spec, f_board=board, family=FAMILIES[key] if key else None)


# ------------------------------------------------------------ shared checks


def _claims_hold(plan: ClockPlan) -> None:
    """The adjustment's rates are what its fields and its route give."""
    a = plan.adjustment
    assert a is not None
    ppc = plan.spec.core.pixels_per_clock
    px = a.route.f_out * ppc
    assert a.pixel_clock_hz == px
    assert a.line_rate_hz == px / a.horizontal.total
    assert a.refresh_hz == px / (a.horizontal.total * a.vertical.total)
    assert a.refresh_error == a.refresh_hz / plan.timing.refresh_hz - 1
    assert a.route.error == 0  # the route's target is the clock it reaches
    if isinstance(a.route, Setting):
        assert a.route.legal()
    for axis, old in ((a.horizontal, plan.spec.horizontal), (a.vertical, plan.spec.vertical)):
        assert (axis.active, axis.sync, axis.sync_polarity) == (old.active, old.sync,
                                                                old.sync_polarity)  # fmt: skip
    for f in ("front_porch", "back_porch"):
        assert getattr(a.horizontal, f) % ppc == 0


def _within(value: Fraction, wanted: Fraction, tolerance: Fraction) -> bool:
    return abs(value / wanted - 1) <= tolerance


def _brute_force(plan: ClockPlan, *, back_porch: bool, lines: bool) -> Fraction | None:
    """The smallest judged error of any raster the clock-enable route can give, moving the
    front porches (and with ``back_porch`` the back porches) within ``plan``'s bounds; None
    when none lands within the tolerance.  Written apart from the search it checks."""
    spec, t = plan.spec, plan.timing
    fit = spec.fit

    def bounds(label: str, name: str) -> tuple[int, int]:
        axis = getattr(spec, label)
        value = getattr(axis, name)
        if fit is not None:
            r = fit.range_of(f"{label}.{name}")
            return (value, value) if r is None else (math.ceil(r.min), math.floor(r.max))
        return value - value // 2, value + axis.blanking // 4

    def totals(label: str) -> set[int]:
        axis = getattr(spec, label)
        names = ("front_porch", "back_porch") if back_porch else ("front_porch",)
        lo = axis.total + sum(bounds(label, n)[0] - getattr(axis, n) for n in names)
        hi = axis.total + sum(bounds(label, n)[1] - getattr(axis, n) for n in names)
        return set(range(lo, hi + 1))

    clock = fit.range_of("pixel_clock_hz") if fit is not None else None
    best: Fraction | None = None
    hs, vs = totals("horizontal"), totals("vertical")
    for k in range(1, int(plan.f_board // (t.pixel_clock_hz / 2)) + 2):
        px = plan.f_board / k
        if clock is not None and not clock.min <= px <= clock.max:
            continue
        for ht in hs:
            line_err = abs(px / ht / t.line_rate_hz - 1)
            if lines and line_err > plan.tolerance:
                continue
            for vt in vs:
                err = abs(px / (ht * vt) / t.refresh_hz - 1)
                err = max(err, line_err) if lines else err
                if err <= plan.tolerance and (best is None or err < best):
                    best = err
    return best


# --------------------------------------------------------------- properties


@PROPERTY
@given(text=panels(), board=boards, key=st.sampled_from(FAMILY_CHOICES))
def test_a_panel_adjustment_never_leaves_the_datasheet(text: str, board: Fraction,
                                                       key: str | None) -> None:  # fmt: skip
    plan = _plan(text, board, key)
    fit = plan.spec.fit
    assert fit is not None
    wanted_tolerance = Fraction(1, 100) if "tolerance_percent: 1}" in text else TOLERANCE
    assert plan.tolerance == wanted_tolerance
    a = plan.adjustment
    assume(a is not None)
    assert a is not None
    _claims_hold(plan)
    for label in ("horizontal", "vertical"):
        for name in ("front_porch", "sync", "back_porch"):
            value = getattr(getattr(a, label), name)
            r = fit.range_of(f"{label}.{name}")
            if r is None:  # fixed by the datasheet
                assert value == getattr(getattr(plan.spec, label), name)
            else:
                assert r.min <= value <= r.max, (label, name, value, r)
    clock = fit.range_of("pixel_clock_hz")
    assert clock is not None and clock.min <= a.pixel_clock_hz <= clock.max
    assert _within(a.refresh_hz, plan.timing.refresh_hz, plan.tolerance)


@PROPERTY
@given(text=panels(), board=boards, key=st.sampled_from(FAMILY_CHOICES))
def test_back_porches_move_only_when_the_front_porches_cannot_absorb(
        text: str, board: Fraction, key: str | None) -> None:  # fmt: skip
    """Pinning the back porches (the datasheet fixes them) finds an adjustment exactly when
    the unpinned one keeps them, and then the same one."""
    plan = _plan(text, board, key)
    assume(plan.adjustment is not None)
    spec = plan.spec
    assert spec.fit is not None
    pinned_fit = Fit(tuple((p, r) for p, r in spec.fit.ranges if not p.endswith("back_porch")),
                     spec.fit.tolerance)  # fmt: skip
    pinned = make_plan(dataclasses.replace(spec, fit=pinned_fit), f_board=board,
                       family=plan.family)  # fmt: skip
    a = plan.adjustment
    assert a is not None
    kept = (a.horizontal.back_porch, a.vertical.back_porch) == (spec.horizontal.back_porch,
                                                                spec.vertical.back_porch)  # fmt: skip
    if pinned.adjustment is not None:
        assert kept
        assert (pinned.adjustment.horizontal, pinned.adjustment.vertical) == (a.horizontal,
                                                                              a.vertical)  # fmt: skip


@PROPERTY
@given(text=panels(), board=boards)
def test_clock_enable_panel_against_brute_force(text: str, board: Fraction) -> None:
    plan = _plan(text, board, None)
    assume(not plan.within_tolerance)
    front_only = _brute_force(plan, back_porch=False, lines=False)
    anything = _brute_force(plan, back_porch=True, lines=False)
    a = plan.adjustment
    assert (a is None) == (anything is None)
    if a is None:
        return
    _claims_hold(plan)
    if front_only is not None:  # the front porches suffice: back porches and syncs kept
        assert a.horizontal.back_porch == plan.spec.horizontal.back_porch
        assert a.vertical.back_porch == plan.spec.vertical.back_porch
        best = front_only
    else:
        best = anything
    # nothing closer was missed, beyond what counts as equal (a tenth of the tolerance)
    assert a.error <= max(best, plan.tolerance * GOOD_ENOUGH)


@PROPERTY
@given(text=monitors(), board=boards, key=st.sampled_from(FAMILY_CHOICES))
def test_a_monitor_adjustment_keeps_line_rate_and_refresh(text: str, board: Fraction,
                                                          key: str | None) -> None:  # fmt: skip
    plan = _plan(text, board, key)
    assert plan.tolerance == TOLERANCE
    a = plan.adjustment
    assume(a is not None)
    assert a is not None
    _claims_hold(plan)
    t = plan.timing
    assert _within(a.refresh_hz, t.refresh_hz, TOLERANCE)
    assert _within(a.line_rate_hz, t.line_rate_hz, TOLERANCE)
    for label in ("horizontal", "vertical"):
        old, new = getattr(plan.spec, label), getattr(a, label)
        for name in ("front_porch", "back_porch"):  # the documented porch bounds
            value, before = getattr(new, name), getattr(old, name)
            assert before - before // 2 <= value <= before + old.blanking // 4


@PROPERTY
@given(text=monitors().filter(lambda t: "pixels_per_clock: 1" in t), board=boards)
def test_clock_enable_monitor_against_brute_force(text: str, board: Fraction) -> None:
    plan = _plan(text, board, None)
    assume(not plan.within_tolerance)
    front_only = _brute_force(plan, back_porch=False, lines=True)
    anything = _brute_force(plan, back_porch=True, lines=True)
    a = plan.adjustment
    assert (a is None) == (anything is None)
    if a is not None and front_only is not None:
        assert a.horizontal.back_porch == plan.spec.horizontal.back_porch
        assert a.vertical.back_porch == plan.spec.vertical.back_porch
        assert a.error <= max(front_only, plan.tolerance * GOOD_ENOUGH)


# ---------------------------------------------------------------- examples


# A made-up panel (figures of our own): typical clock at the datasheet's 35 MHz maximum,
# front porch at least 16 and back porch at least 40, as in issue 10's panel.
PANEL_AT_ITS_MAXIMUM = """\
name: panel
pixel_clock_hz: {min: 25 MHz, typ: 35 MHz, max: 35 MHz}
horizontal:
  active: 800
  front_porch: {min: 16, typ: 16, max: 200}
  sync: {min: 1, typ: 48, max: 60}
  back_porch: {min: 40, typ: 40, max: 80}
  sync_polarity: negative
vertical:
  active: 480
  front_porch: {min: 7, typ: 13, max: 40}
  sync: {min: 1, typ: 3, max: 10}
  back_porch: {min: 29, typ: 29, max: 40}
  sync_polarity: negative
fit: {}
"""


@pytest.mark.parametrize("board_mhz, key", [(27, "gowin"), (12, "ice40")])
def test_a_panel_at_its_clock_maximum_stays_inside_its_minimums(board_mhz: int,
                                                                key: str) -> None:  # fmt: skip
    plan = make_plan(loads(PANEL_AT_ITS_MAXIMUM), f_board=Fraction(board_mhz * MHZ),
                     family=FAMILIES[key])  # fmt: skip
    assert not plan.within_tolerance
    a = plan.adjustment
    assert a is not None
    assert a.pixel_clock_hz <= 35 * MHZ
    assert a.horizontal.front_porch >= 16 and a.horizontal.back_porch >= 40
    assert a.vertical.front_porch >= 7 and a.vertical.back_porch >= 29
    # the front porches and the vertical total absorb it: back porches and syncs kept
    assert a.horizontal.back_porch == 40 and a.vertical.back_porch == 29
    assert (a.horizontal.sync, a.vertical.sync) == (plan.spec.horizontal.sync, plan.spec.vertical.sync)


def test_a_panel_clock_the_route_cannot_bring_inside_gets_no_adjustment() -> None:
    """ECP5 from 25 MHz: with the phase detector at 10 MHz or more (FPGA-TN-02200, as
    docs/clocking.md quotes it), the output moves in steps of 12.5 or 25 MHz near 35 MHz
    (25 * CLKFB_DIV / CLKI_DIV, CLKI_DIV 1 or 2): 25 MHz or 37.5 MHz, neither of which a
    raster inside this panel's ranges can use."""
    plan = make_plan(loads(PANEL_AT_ITS_MAXIMUM), f_board=Fraction(25 * MHZ),
                     family=FAMILIES["ecp5"])  # fmt: skip
    assert not plan.within_tolerance and plan.adjustment is None
