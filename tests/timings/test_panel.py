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


# An invented 800x480 panel datasheet (demo data, not a real part).
H = AxisRanges(800, r(16, 354, 210), r(1, 40, 20), R.fixed(46), "negative")
V = AxisRanges(480, r(7, 147, 22), r(1, 20, 10), R.fixed(23), "negative")


def inside(a: AxisRanges, chosen) -> bool:
    return all(getattr(chosen, f) in a.range_of(f) for f in ("front_porch", "sync", "back_porch"))


def test_fixed_board_clock_hits_the_target_exactly() -> None:
    res = fit(H, V, Range.fixed(33_000_000), refresh=Fraction(60))
    assert res.met and res.refresh_hz == 60 and res.bounds == ()
    assert inside(H, res.horizontal) and inside(V, res.vertical)


def test_clock_range_keeps_typical_values() -> None:
    res = fit(H, V, r(26_400_000, 46_800_000, 33_300_000), refresh=Fraction(60))
    assert res.met and res.refresh_hz == 60
    assert (res.horizontal.front_porch, res.vertical.front_porch) == (210, 22)


def test_unreachable_target_is_reported_with_the_binding_ranges() -> None:
    res = fit(H, V, Range.fixed(25_000_000), refresh=Fraction(75))
    assert not res.met
    assert res.error < 0  # the smallest frame is still too slow
    assert "horizontal.front_porch at its min 16" in res.bounds
    assert "vertical.front_porch at its min 7" in res.bounds
    assert inside(H, res.horizontal) and inside(V, res.vertical)


def test_clock_range_bound_is_named() -> None:
    res = fit(H, V, r(26_400_000, 30_000_000, 28_000_000), refresh=Fraction(60))
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
pixel_clock_hz: {{min: 26.4 MHz, typ: 33.3 MHz, max: 46.8 MHz}}
horizontal:
  active: 800
  front_porch: {{min: 16, typ: 210, max: 354}}
  sync: {{min: 1, typ: 20, max: 40}}
  back_porch: 46
  sync_polarity: negative
vertical:
  active: 480
  front_porch: {{min: 7, typ: 22, max: 147}}
  sync: {{min: 1, typ: 10, max: 20}}
  back_porch: 23
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
    # At 30 MHz no whole totals give exactly 60 Hz inside the ranges (500000 pixels per
    # frame would need V below its 511-line minimum or H below 863): the nearest is
    # reported with the range that bound it.
    s = loads(PANEL.format(fit="  pixel_clock_hz: 30 MHz\n  refresh: 60"))
    assert s.notes == ("target 60.000 Hz, landed at 60.000 Hz (-0.001 %); "
                       "limited by vertical.front_porch at its min 7",)


def test_spec_fit_that_cannot_be_met_is_an_error() -> None:
    with pytest.raises(SpecError) as info:
        loads(PANEL.format(fit="  pixel_clock_hz: 27 MHz\n  refresh: 75"), "p.yaml")
    (line,) = str(info.value).splitlines()
    assert re.match(r"^p\.yaml:15:1: fit: no values inside the datasheet ranges reach the "
                    r"target within 0\.50 %: target 75\.000 Hz, landed at 61\.\d+ Hz "
                    r"\(-1\d\.\d+ %\); limited by horizontal\.front_porch at its min 16, ", line)


def test_spec_board_clock_outside_datasheet_range() -> None:
    with pytest.raises(SpecError) as info:
        loads(PANEL.format(fit="  pixel_clock_hz: 50 MHz"), "p.yaml")
    assert re.match(r"^p\.yaml:16:19: fit\.pixel_clock_hz: lies outside the datasheet range "
                    r"26\.400 MHz \.\. 46\.800 MHz, got 50\.000 MHz$", str(info.value))


def test_range_without_fit_is_refused() -> None:
    text = PANEL.format(fit="  refresh: 60").replace("fit:\n  refresh: 60\n", "")
    with pytest.raises(SpecError) as info:
        loads(text, "p.yaml")
    assert re.match(r"^p\.yaml:2:17: pixel_clock_hz: a range needs a fit: section with a "
                    r"refresh or pixel_clock_hz target$", str(info.value))


def test_bad_range_is_located() -> None:
    text = PANEL.format(fit="  refresh: 60").replace("{min: 16, typ: 210, max: 354}",
                                                     "{min: 354, max: 16}")
    with pytest.raises(SpecError) as info:
        loads(text, "p.yaml")
    assert re.match(r"^p\.yaml:5:16: horizontal\.front_porch: min must not exceed max, "
                    r"got min 354 and max 16$", str(info.value))


def test_spec_fixed_clock_and_refresh_only() -> None:
    text = PANEL.format(fit="  refresh: 60").replace(
        "pixel_clock_hz: {min: 26.4 MHz, typ: 33.3 MHz, max: 46.8 MHz}", "pixel_clock_hz: 33 MHz")
    s = loads(text)
    assert s.pixel_clock_hz == 33_000_000
    assert s.pixel_clock_hz / (s.horizontal.total * s.vertical.total) == 60


def test_spec_target_defaults_to_typical_refresh() -> None:
    # No refresh given: the target is the refresh of the typical values, which the
    # clock range absorbs exactly at the typical porches.
    s = loads(PANEL.format(fit="  tolerance_percent: 0.1"))
    assert (s.horizontal.front_porch, s.vertical.front_porch) == (210, 22)
    assert s.pixel_clock_hz == 33_300_000


def test_fit_needs_a_target() -> None:
    text = PANEL.format(fit="  {}").replace("fit:\n  {}", "fit: {}").replace(
        "typ: 33.3 MHz, ", "")
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
