"""When no route reaches the pixel clock closely enough: a raster whose clock the route does reach.

The trade's usual trick: run at a clock the board can make and change the blanking
so that line rate and refresh stay on target.  Which fields may move, in order:

1. the front porches (horizontal and vertical): the back porch and the sync width,
   and so the picture's position relative to the sync, stay as they are; the
   vertical front porch changes the number of lines, the vertical total;
2. only when no such raster lands within the tolerance, the back porches too (each
   axis moves its front porch as far as it may first, then its back porch).

The sync widths never move.  Each field stays inside its bounds:

* a spec fitted to datasheet ranges (``spec.fit``): the field's datasheet range, or
  the value itself when the datasheet fixed it; the reached pixel clock stays
  inside the datasheet's clock range when it gives one;
* otherwise a porch keeps at least :data:`SHRINK_SHARE` of its width and grows by at
  most :data:`GROW_SHARE` of its axis' blanking.

Horizontal values move in steps of pixels_per_clock.  A raster is accepted when its
refresh, and (for a monitor, i.e. a spec without datasheet ranges, which identifies
the mode by it) its line rate, are within the tolerance of the spec's.  Among the
accepted ones: the smallest error, except that errors below :data:`GOOD_ENOUGH` of
the tolerance count as equal and then the smallest change of the totals wins.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterator
from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.families import Family
from synccore.clocking.solve import EnableSetting, Route, Setting, reachable
from synccore.model import Timing
from synccore.spec import Axis, Spec, ValueRange

SHRINK_SHARE = Fraction(1, 2)
"""Without datasheet ranges, a porch keeps at least this share of its width."""

GROW_SHARE = Fraction(1, 4)
"""Without datasheet ranges, a porch grows by at most this share of its axis' blanking."""

GOOD_ENOUGH = Fraction(1, 10)
"""Errors below this share of the tolerance (500 ppm of ±0.5 %) count as equal, and the
smallest change of the totals wins among them: a display cannot tell them apart, while a
smaller change keeps the raster nearer the spec's.  (Our own choice; closer than about
100 ppm is pointless anyway, as board oscillators themselves are typically specified to
±50-100 ppm: crystal oscillator data sheets, from memory.)"""

STAGES: tuple[tuple[str, ...], ...] = (("front_porch",), ("front_porch", "back_porch"))
"""The fields that may move, in the order they are tried."""

AXES = ("horizontal", "vertical")


@dataclass(frozen=True)
class Bounds:
    """The whole values one field may take during the adjustment."""

    low: int
    high: int
    source: str  # "datasheet", "datasheet (fixed)" or "porch bound"


@dataclass(frozen=True)
class Adjustment:
    """A raster whose pixel clock the route reaches, with the rates it gives.

    Every figure is computed from the fields: ``refresh_hz`` is
    ``pixel_clock_hz / (horizontal.total * vertical.total)``, ``line_rate_hz`` is
    ``pixel_clock_hz / horizontal.total``.
    """

    horizontal: Axis
    vertical: Axis
    route: Route  # the setting; its target is the core clock it reaches (error 0)
    pixel_clock_hz: Fraction  # the pixel clock reached: the route's output x pixels_per_clock
    wanted_refresh_hz: Fraction
    wanted_line_rate_hz: Fraction
    judges_line_rate: bool  # a monitor: the line rate is held to the tolerance too
    bounds: tuple[tuple[str, Bounds], ...]  # every field's bounds, by dotted path

    @property
    def h_total(self) -> int:
        return self.horizontal.total

    @property
    def v_total(self) -> int:
        return self.vertical.total

    @property
    def line_rate_hz(self) -> Fraction:
        return self.pixel_clock_hz / self.horizontal.total

    @property
    def refresh_hz(self) -> Fraction:
        return self.pixel_clock_hz / (self.horizontal.total * self.vertical.total)

    @property
    def refresh_error(self) -> Fraction:
        return self.refresh_hz / self.wanted_refresh_hz - 1

    @property
    def line_rate_error(self) -> Fraction:
        return self.line_rate_hz / self.wanted_line_rate_hz - 1

    @property
    def error(self) -> Fraction:
        """The error the adjustment is judged by (absolute): refresh, and line rate if judged."""
        if self.judges_line_rate:
            return max(abs(self.refresh_error), abs(self.line_rate_error))
        return abs(self.refresh_error)

    def moved(self, spec: Spec) -> tuple[str, ...]:
        """The dotted paths of the fields that differ from ``spec``'s."""
        return tuple(f"{label}.{name}" for label in AXES for name in ("front_porch", "back_porch")
                     if getattr(getattr(self, label), name) !=
                     getattr(getattr(spec, label), name))  # fmt: skip


def field_bounds(spec: Spec, label: str, name: str) -> Bounds:
    """The values ``label.name`` (a porch) may take; see the module doc."""
    axis: Axis = getattr(spec, label)
    value: int = getattr(axis, name)
    step = spec.core.pixels_per_clock if label == "horizontal" else 1
    if spec.fit is not None:
        r = spec.fit.range_of(f"{label}.{name}")
        if r is None:
            return Bounds(value, value, "datasheet (fixed)")
        low, high, source = math.ceil(r.min), math.floor(r.max), "datasheet"
    else:
        low = value - math.floor(value * SHRINK_SHARE)
        high = value + math.floor(axis.blanking * GROW_SHARE)
        source = "porch bound"
    low, high = -(-low // step) * step, high // step * step
    # the spec's own value is always allowed (it lies inside any range the fit honoured)
    return Bounds(min(low, value), max(high, value), source)


def clock_range(spec: Spec) -> ValueRange | None:
    """The datasheet's pixel clock range, when the spec was fitted to one."""
    return None if spec.fit is None else spec.fit.range_of("pixel_clock_hz")


def _spread(axis: Axis, delta: int, moved: tuple[str, ...],
            bounds: dict[str, Bounds]) -> Axis:  # fmt: skip
    """``axis`` with ``delta`` added: to the first field of ``moved`` as far as it may, then on."""
    values = {name: getattr(axis, name) for name in ("front_porch", "back_porch")}
    for name in moved:
        b = bounds[name]
        new = min(max(values[name] + delta, b.low), b.high)
        delta -= new - values[name]
        values[name] = new
    assert delta == 0, "totals are chosen inside the span"
    return dataclasses.replace(axis, **values)


def _span(axis: Axis, moved: tuple[str, ...], bounds: dict[str, Bounds]) -> tuple[int, int]:
    low = axis.total + sum(bounds[n].low - getattr(axis, n) for n in moved)
    high = axis.total + sum(bounds[n].high - getattr(axis, n) for n in moved)
    return low, high


def _routes(f_board: Fraction, family: Family | None, low: Fraction,
            high: Fraction) -> list[Route]:  # fmt: skip
    """Every route whose core clock lies in ``[low, high]``."""
    if low > high or high <= 0:
        return []
    if family is not None:
        return list(reachable(family, f_board, low, high))
    top = int(f_board // low) if low > 0 else 0
    bottom = max(1, -(-f_board // high))
    return [EnableSetting(f_board, low, k) for k in range(int(bottom), top + 1)
            if low <= f_board / k <= high]  # fmt: skip


def _pairs(frame: Fraction, hs: range, vs: range) -> Iterator[tuple[int, int]]:
    """(h_total, v_total) pairs near ``frame`` pixels per frame: for each value of the
    shorter range, the values of the other next to the ideal one (or its nearest end)."""
    if not hs or not vs:
        return
    if len(hs) <= len(vs):
        for ht in hs:
            yield from ((ht, vt) for vt in _around(frame / ht, vs))
    else:
        for vt in vs:
            yield from ((ht, vt) for ht in _around(frame / vt, hs))


def _around(ideal: Fraction, values: range) -> set[int]:
    """The members of ``values`` just below and just above ``ideal``, clamped to its ends."""
    step = values.step
    below = values.start + math.floor((ideal - values.start) / step) * step
    return {min(max(x, values.start), values[-1]) for x in (below, below + step)}


_Key = tuple[Fraction, Fraction, Fraction, Fraction, int, int]


def find(spec: Spec, f_board: Fraction, family: Family | None,
         tolerance: Fraction) -> Adjustment | None:  # fmt: skip
    """The best accepted adjustment of the earliest stage that has one; None if none has."""
    bounds = {label: {name: field_bounds(spec, label, name)
                      for name in ("front_porch", "back_porch")} for label in AXES}  # fmt: skip
    stages: list[tuple[tuple[str, ...], tuple[tuple[int, int], ...]]] = []
    for moved in STAGES:
        spans = tuple(_span(getattr(spec, label), moved, bounds[label]) for label in AXES)
        if all(spans != seen for _, seen in stages):  # a later stage that moves nothing more
            stages.append((moved, spans))
    # the routes of the widest window (the last stage's), found once for every stage
    low, high = _window(spec, tolerance, stages[-1][1])
    n = spec.core.pixels_per_clock
    routes = _routes(f_board, family, low / n, high / n)
    for moved, stage_spans in stages:
        found = _search(spec, routes, tolerance, moved, stage_spans, bounds)
        if found is not None:
            return found
    return None


def _window(spec: Spec, tolerance: Fraction,
            spans: tuple[tuple[int, int], ...]) -> tuple[Fraction, Fraction]:  # fmt: skip
    """The pixel clocks that could serve rasters within ``spans``: refresh (and for a monitor
    line rate) within the tolerance, inside the datasheet's clock range if there is one."""
    t = Timing(spec)
    (h_lo, h_hi), (v_lo, v_hi) = spans
    low = t.refresh_hz * h_lo * v_lo * (1 - tolerance)
    high = t.refresh_hz * h_hi * v_hi * (1 + tolerance)
    if spec.fit is None:
        low = max(low, t.line_rate_hz * h_lo * (1 - tolerance))
        high = min(high, t.line_rate_hz * h_hi * (1 + tolerance))
    limit = clock_range(spec)
    if limit is not None:
        low, high = max(low, limit.min), min(high, limit.max)
    return low, high


def _search(spec: Spec, routes: list[Route], tolerance: Fraction, moved: tuple[str, ...],
            spans: tuple[tuple[int, int], ...], bounds: dict[str, dict[str, Bounds]]
            ) -> Adjustment | None:  # fmt: skip
    """The best raster moving only ``moved`` (totals within ``spans``) over ``routes``."""
    t = Timing(spec)
    h, v, n = spec.horizontal, spec.vertical, t.ppc
    (h_lo, h_hi), (v_lo, v_hi) = spans
    refresh, line = t.refresh_hz, t.line_rate_hz
    equal_below = tolerance * GOOD_ENOUGH
    judges_line = spec.fit is None
    low, high = _window(spec, tolerance, spans)
    best: tuple[_Key, Route, int, int] | None = None
    for r in routes:
        px = r.f_out * n
        if not low <= px <= high:
            continue
        hs_lo, hs_hi = h_lo, h_hi
        if judges_line:  # the line rate within tolerance bounds the line length
            hs_lo = max(hs_lo, math.ceil(px / (line * (1 + tolerance))))
            hs_hi = min(hs_hi, math.floor(px / (line * (1 - tolerance))))
        hs = range(-(-hs_lo // n) * n, hs_hi // n * n + 1, n)
        vs = range(v_lo, v_hi + 1)
        for ht, vt in _pairs(px / refresh, hs, vs):
            r_err = abs(px / (ht * vt) / refresh - 1)
            judged = max(r_err, abs(px / ht / line - 1)) if judges_line else r_err
            if judged > tolerance:
                continue
            change = Fraction(abs(ht - h.total), h.total) + Fraction(abs(vt - v.total), v.total)
            vco = r.f_vco if isinstance(r, Setting) else Fraction(0)
            key = (max(judged, equal_below), change, judged, -vco, ht, vt)
            if best is None or key < best[0]:
                best = (key, r, ht, vt)
    if best is None:
        return None
    _, r, ht, vt = best
    flat = tuple((f"{label}.{name}", b) for label in AXES for name, b in bounds[label].items())
    return Adjustment(
        horizontal=_spread(h, ht - h.total, moved, bounds["horizontal"]),
        vertical=_spread(v, vt - v.total, moved, bounds["vertical"]),
        route=dataclasses.replace(r, target=r.f_out),
        pixel_clock_hz=r.f_out * n,
        wanted_refresh_hz=refresh,
        wanted_line_rate_hz=line,
        judges_line_rate=judges_line,
        bounds=flat,
    )
