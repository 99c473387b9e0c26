"""Choose timing values inside panel datasheet ranges so that a target is met.

LCD panel datasheets give min / typ / max for the porches, sync widths and the
pixel clock.  Given those ranges and a target refresh rate (and, when the
board's clock is fixed, that clock), :func:`fit` picks whole numbers inside
every range whose refresh comes as close to the target as the ranges allow,
staying as near the typical values as it can.  It never leaves a range; when
the target cannot be met it still returns the closest choice, says how far off
it is and which range bounds stopped it (``met`` is then False).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Axis

DEFAULT_TOLERANCE = Fraction(5, 1000)
"""±0.5 %: the pixel clock tolerance of VESA DMT (from memory), used as 'met' by default."""

FIELDS = ("front_porch", "sync", "back_porch")
_ABSORB_ORDER = ("front_porch", "back_porch", "sync")  # porches give way before the sync width


@dataclass(frozen=True)
class Range:
    """A datasheet range; ``typ`` is None when the datasheet gives none."""

    min: Fraction
    max: Fraction
    typ: Fraction | None = None

    @staticmethod
    def fixed(value: Fraction | int) -> Range:
        v = Fraction(value)
        return Range(v, v, v)

    @property
    def target(self) -> Fraction:
        """The value to stay near: typ, or the middle of the range."""
        return self.typ if self.typ is not None else (self.min + self.max) / 2

    def __contains__(self, value: object) -> bool:
        return isinstance(value, (int, Fraction)) and self.min <= value <= self.max


@dataclass(frozen=True)
class AxisRanges:
    """One direction of a panel: a fixed active count and ranges for the rest."""

    active: int
    front_porch: Range
    sync: Range
    back_porch: Range
    sync_polarity: str

    def range_of(self, name: str) -> Range:
        r: Range = getattr(self, name)
        return r

    @property
    def total_min(self) -> int:
        return self.active + sum(math.ceil(self.range_of(f).min) for f in FIELDS)

    @property
    def total_max(self) -> int:
        return self.active + sum(math.floor(self.range_of(f).max) for f in FIELDS)

    def typical(self) -> dict[str, int]:
        """Whole typical values, each inside its range."""
        out = {}
        for f in FIELDS:
            r = self.range_of(f)
            out[f] = min(max(round(r.target), math.ceil(r.min)), math.floor(r.max))
        return out


@dataclass(frozen=True)
class FitResult:
    """The chosen timing, how close it came and which ranges limited it."""

    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis
    target_refresh_hz: Fraction
    met: bool
    bounds: tuple[str, ...]  # e.g. "horizontal.front_porch at its max 240"

    @property
    def refresh_hz(self) -> Fraction:
        return self.pixel_clock_hz / (self.horizontal.total * self.vertical.total)

    @property
    def error(self) -> Fraction:
        """Relative refresh error (positive: faster than the target)."""
        return self.refresh_hz / self.target_refresh_hz - 1


class FitError(ValueError):
    """Ranges that admit no choice at all (e.g. min above max)."""


def _distribute(axis: AxisRanges, total: int) -> Axis:
    """Split ``total`` into porches and sync inside their ranges, starting from typical."""
    values = axis.typical()
    delta = total - axis.active - sum(values.values())
    for f in _ABSORB_ORDER:
        if delta == 0:
            break
        r = axis.range_of(f)
        lo, hi = math.ceil(r.min), math.floor(r.max)
        new = min(max(values[f] + delta, lo), hi)
        delta -= new - values[f]
        values[f] = new
    if delta:  # pragma: no cover - totals are always chosen inside [total_min, total_max]
        raise FitError(f"cannot split total {total}")
    return Axis(axis.active, values["front_porch"], values["sync"], values["back_porch"],
                axis.sync_polarity)  # fmt: skip


def _check_ranges(label: str, axis: AxisRanges) -> None:
    for f in FIELDS:
        r = axis.range_of(f)
        if math.ceil(r.min) > math.floor(r.max):
            raise FitError(f"{label}.{f}: range {r.min}..{r.max} holds no whole number")


def _bounds(label: str, axis: AxisRanges, chosen: Axis, want_more: bool) -> list[str]:
    out = []
    for f in FIELDS:
        r = axis.range_of(f)
        v = getattr(chosen, f)
        if r.min == r.max:
            continue
        if want_more and v == math.floor(r.max):
            out.append(f"{label}.{f} at its max {v}")
        if not want_more and v == math.ceil(r.min):
            out.append(f"{label}.{f} at its min {v}")
    return out


def _best_totals(h: AxisRanges, v: AxisRanges, clock: Fraction, refresh: Fraction,
                 h_typ: int, v_typ: int) -> tuple[int, int]:  # fmt: skip
    """Totals whose refresh at ``clock`` is nearest ``refresh``; ties go nearest the typicals."""
    pixels = float(clock / refresh)
    best: tuple[float, float, int, int] | None = None
    for ht in range(h.total_min, h.total_max + 1):
        ideal = pixels / ht
        for vt in {math.floor(ideal), math.ceil(ideal)}:
            vt = min(max(vt, v.total_min), v.total_max)
            err = abs(pixels / (ht * vt) - 1.0)
            # Errors within a millionth count as equal, so closeness to typical decides.
            key = (round(err, 6), abs(ht - h_typ) / h_typ + abs(vt - v_typ) / v_typ, ht, vt)
            if best is None or key < best:
                best = key
    assert best is not None
    return best[2], best[3]


def fit(h: AxisRanges, v: AxisRanges, clock: Range, *, refresh: Fraction | None = None,
        tolerance: Fraction = DEFAULT_TOLERANCE) -> FitResult:  # fmt: skip
    """Choose porches, syncs and (for a clock range) the clock that come nearest ``refresh``.

    ``clock`` is the datasheet's clock range, or :meth:`Range.fixed` for a board
    whose clock is fixed.  Without ``refresh`` the target is the refresh of the
    typical values.  ``met`` says whether the result lands within ``tolerance``.
    """
    _check_ranges("horizontal", h)
    _check_ranges("vertical", v)
    if clock.min > clock.max or clock.min <= 0:
        raise FitError(f"pixel clock range {clock.min}..{clock.max} is empty or not above 0")
    h_typ = h.active + sum(h.typical().values())
    v_typ = v.active + sum(v.typical().values())
    if refresh is None:
        refresh = clock.target / (h_typ * v_typ)
    if refresh <= 0:
        raise FitError(f"refresh must be above 0, got {refresh}")
    bounds: list[str] = []
    want = refresh * h_typ * v_typ
    if clock.min <= want <= clock.max and clock.min != clock.max:
        # The clock range absorbs the target at the typical values: exact.
        return FitResult(want, _distribute(h, h_typ), _distribute(v, v_typ), refresh, True, ())
    if clock.min == clock.max:
        chosen_clock = clock.min
    else:
        chosen_clock = clock.max if want > clock.max else clock.min
        bounds.append(f"pixel_clock_hz at its {'max' if want > clock.max else 'min'} "
                      f"{chosen_clock} Hz")  # fmt: skip
    ht, vt = _best_totals(h, v, chosen_clock, refresh, h_typ, v_typ)
    ha, va = _distribute(h, ht), _distribute(v, vt)
    got = chosen_clock / (ht * vt)
    met = abs(got / refresh - 1) <= tolerance
    if got != refresh:
        want_more = got > refresh  # too fast: the totals wanted to grow
        bounds += _bounds("horizontal", h, ha, want_more) + _bounds("vertical", v, va, want_more)
    elif clock.min == clock.max:
        bounds = []
    return FitResult(chosen_clock, ha, va, refresh, met, tuple(bounds))
