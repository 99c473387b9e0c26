"""The panel range fitter: it never leaves a range, and it is honest when it falls short."""

from __future__ import annotations

import itertools
import re
from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from synccore import loads
from synccore.errors import SpecError
from synccore.timings.panel import AxisRanges, Range, fit

R = Range


def r(lo: int, hi: int, typ: int | None = None) -> Range:
    return Range(Fraction(lo), Fraction(hi), None if typ is None else Fraction(typ))


# A made-up 800x480 panel datasheet (figures of our own, not a real part's; the same
# panel as examples/panel_ranges.yaml).  Typical totals 800 + 96 + 24 + 80 = 1000 and
# 480 + 20 + 5 + 30 = 535; the ranges allow totals 912 .. 1168 and 518 .. 640.
H = AxisRanges(800, r(24, 240, 96), r(8, 48, 24), R.fixed(80), "negative")
V = AxisRanges(480, r(6, 120, 20), r(2, 10, 5), R.fixed(30), "negative")


def inside(a: AxisRanges, chosen) -> bool:
    return all(getattr(chosen, f) in a.range_of(f) for f in ("front_porch", "sync", "back_porch"))


def test_fixed_board_clock_hits_the_target_exactly() -> None:
    # 33 MHz / 60 Hz = 550000 = 1000 x 550 pixels per frame, both totals inside the ranges.
    res = fit(H, V, Range.fixed(33_000_000), refresh=Fraction(60))
    assert res.met and res.refresh_hz == 60 and res.bounds == ()
    assert inside(H, res.horizontal) and inside(V, res.vertical)


def test_clock_range_keeps_typical_values() -> None:
    # 60 Hz x 1000 x 535 = 32.1 MHz lies inside 25 .. 38 MHz: the typical values stay.
    res = fit(H, V, r(25_000_000, 38_000_000, 32_000_000), refresh=Fraction(60))
    assert res.met and res.refresh_hz == 60
    assert (res.horizontal.front_porch, res.vertical.front_porch) == (96, 20)


def test_unreachable_target_is_reported_with_the_binding_ranges() -> None:
    # The smallest frame, 912 x 518 = 472416 pixels, gives 25 MHz / 472416 = 52.92 Hz.
    res = fit(H, V, Range.fixed(25_000_000), refresh=Fraction(75))
    assert not res.met
    assert res.error < 0  # the smallest frame is still too slow
    assert "horizontal.front_porch at its min 24" in res.bounds
    assert "vertical.front_porch at its min 6" in res.bounds
    assert inside(H, res.horizontal) and inside(V, res.vertical)


def test_clock_range_bound_is_named() -> None:
    # The typical values want 32.1 MHz, above the range's 30 MHz.
    res = fit(H, V, r(25_000_000, 30_000_000, 28_000_000), refresh=Fraction(60))
    assert res.bounds[0] == "pixel_clock_hz at its max 30000000 Hz"
    assert res.pixel_clock_hz == 30_000_000


small = st.tuples(st.integers(0, 6), st.integers(0, 6)).map(sorted)


@st.composite
def axis_ranges(draw: st.DrawFn, active: int) -> AxisRanges:
    parts = []
    for minimum in (0, 1, 0):
        lo, hi = draw(small)
        lo, hi = max(lo, minimum), max(hi, minimum)
        typ = draw(st.one_of(st.none(), st.integers(lo, hi)))
        parts.append(r(lo, hi, typ))
    return AxisRanges(active, parts[0], parts[1], parts[2], "positive")


def brute_best(h: AxisRanges, v: AxisRanges, clock: int, refresh: Fraction) -> Fraction:
    """Smallest relative error over every choice inside the ranges (exhaustive)."""
    def totals(a: AxisRanges):
        spans = [range(int(a.range_of(f).min), int(a.range_of(f).max) + 1)
                 for f in ("front_porch", "sync", "back_porch")]  # fmt: skip
        return {a.active + sum(c) for c in itertools.product(*spans)}

    return min(abs(Fraction(clock, ht * vt) / refresh - 1)
               for ht in totals(h) for vt in totals(v))  # fmt: skip


@settings(max_examples=150, deadline=None)
@given(h=axis_ranges(40), v=axis_ranges(30), clock=st.integers(50_000, 200_000),
       refresh=st.integers(20, 120))  # fmt: skip
def test_property_never_leaves_a_range_and_is_honest(h, v, clock, refresh) -> None:
    res = fit(h, v, Range.fixed(clock), refresh=Fraction(refresh))
    assert inside(h, res.horizontal) and inside(v, res.vertical)
    assert res.pixel_clock_hz == clock
    best = brute_best(h, v, clock, Fraction(refresh))
    # The fitter finds the best reachable refresh (errors within 1e-6 count as equal).
    assert abs(res.error) <= best + Fraction(1, 10**6)
    assert res.met == (abs(res.error) <= Fraction(5, 1000))
    if not res.met:
        assert best > Fraction(5, 1000) - Fraction(1, 10**6)  # no choice meets it


PANEL = """\
name: panel
pixel_clock_hz: {{min: 25 MHz, typ: 32 MHz, max: 38 MHz}}
horizontal:
  active: 800
  front_porch: {{min: 24, typ: 96, max: 240}}
  sync: {{min: 8, typ: 24, max: 48}}
  back_porch: 80
  sync_polarity: negative
vertical:
  active: 480
  front_porch: {{min: 6, typ: 20, max: 120}}
  sync: {{min: 2, typ: 5, max: 10}}
  back_porch: 30
  sync_polarity: negative
fit:
{fit}
"""


def test_spec_with_ranges_and_board_clock() -> None:
    s = loads(PANEL.format(fit="  pixel_clock_hz: 33 MHz\n  refresh: 60"))
    assert s.pixel_clock_hz == 33_000_000
    assert s.pixel_clock_hz / (s.horizontal.total * s.vertical.total) == 60
    assert s.origin == "fitted to datasheet ranges"
    assert s.notes == ("target 60.000 Hz, landed at 60.000 Hz (+0.000 %)",)
    # At 30 MHz no whole totals give exactly 60 Hz inside the ranges: 500000 = 2^5 x 5^6
    # pixels per frame, and its only divisor inside V's 518 .. 640 is 625, which leaves
    # H = 800, below its 912.  Trying every pair of totals inside the ranges (brute_best),
    # the nearest product is 956 x 523 = 499988, 12 pixels short: 30 MHz / 499988 =
    # 60.00144 Hz, +12/499988 = +0.0024 %.  No range bound stops it, so none is named.
    assert brute_best(H, V, 30_000_000, Fraction(60)) == Fraction(12, 499988)
    s = loads(PANEL.format(fit="  pixel_clock_hz: 30 MHz\n  refresh: 60"))
    assert (s.horizontal.total, s.vertical.total) == (956, 523)
    assert s.notes == ("target 60.000 Hz, landed at 60.001 Hz (+0.002 %)",)


def test_spec_fit_that_cannot_be_met_is_an_error() -> None:
    with pytest.raises(SpecError) as info:
        loads(PANEL.format(fit="  pixel_clock_hz: 27 MHz\n  refresh: 75"), "p.yaml")
    # The smallest frame, 912 x 518 = 472416 pixels: 27 MHz / 472416 = 57.1530 Hz,
    # 57.1530 / 75 - 1 = -23.796 %, with every porch and sync range at its minimum.
    assert str(info.value) == (
        "p.yaml:15:1: fit: no values inside the datasheet ranges reach the target within "
        "0.50 %: target 75.000 Hz, landed at 57.153 Hz (-23.796 %); limited by "
        "horizontal.front_porch at its min 24, horizontal.sync at its min 8, "
        "vertical.front_porch at its min 6, vertical.sync at its min 2")


def test_spec_board_clock_outside_datasheet_range() -> None:
    with pytest.raises(SpecError) as info:
        loads(PANEL.format(fit="  pixel_clock_hz: 50 MHz"), "p.yaml")
    assert re.match(r"^p\.yaml:16:19: fit\.pixel_clock_hz: lies outside the datasheet range "
                    r"25\.000 MHz \.\. 38\.000 MHz, got 50\.000 MHz$", str(info.value))


def test_range_without_fit_is_refused() -> None:
    text = PANEL.format(fit="  refresh: 60").replace("fit:\n  refresh: 60\n", "")
    with pytest.raises(SpecError) as info:
        loads(text, "p.yaml")
    assert re.match(r"^p\.yaml:2:17: pixel_clock_hz: a range needs a fit: section with a "
                    r"refresh or pixel_clock_hz target$", str(info.value))


def test_bad_range_is_located() -> None:
    text = PANEL.format(fit="  refresh: 60").replace("{min: 24, typ: 96, max: 240}",
                                                     "{min: 240, max: 24}")
    with pytest.raises(SpecError) as info:
        loads(text, "p.yaml")
    assert re.match(r"^p\.yaml:5:16: horizontal\.front_porch: min must not exceed max, "
                    r"got min 240 and max 24$", str(info.value))


def test_spec_fixed_clock_and_refresh_only() -> None:
    text = PANEL.format(fit="  refresh: 60").replace(
        "pixel_clock_hz: {min: 25 MHz, typ: 32 MHz, max: 38 MHz}", "pixel_clock_hz: 33 MHz")
    s = loads(text)
    assert s.pixel_clock_hz == 33_000_000
    assert s.pixel_clock_hz / (s.horizontal.total * s.vertical.total) == 60


def test_spec_target_defaults_to_typical_refresh() -> None:
    # No refresh given: the target is the refresh of the typical values, which the
    # clock range absorbs exactly at the typical porches.
    s = loads(PANEL.format(fit="  tolerance_percent: 0.1"))
    assert (s.horizontal.front_porch, s.vertical.front_porch) == (96, 20)
    assert s.pixel_clock_hz == 32_000_000


def test_fit_needs_a_target() -> None:
    text = PANEL.format(fit="  {}").replace("fit:\n  {}", "fit: {}").replace(
        "typ: 32 MHz, ", "")
    with pytest.raises(SpecError) as info:
        loads(text, "p.yaml")
    assert str(info.value) == ("p.yaml:15:1: fit.refresh: required key is missing (the clock "
                               "range has no typ to take the target from)")


@settings(max_examples=150, deadline=None)
@given(h=axis_ranges(40), v=axis_ranges(30),
       clock=st.tuples(st.integers(50_000, 200_000), st.integers(50_000, 200_000)).map(sorted),
       refresh=st.integers(20, 120))  # fmt: skip
def test_property_clock_range_is_never_left(h, v, clock, refresh) -> None:
    lo, hi = clock
    res = fit(h, v, r(lo, hi), refresh=Fraction(refresh))
    assert lo <= res.pixel_clock_hz <= hi
    assert inside(h, res.horizontal) and inside(v, res.vertical)
    if res.met and lo < hi:
        assert abs(res.error) <= Fraction(5, 1000)
