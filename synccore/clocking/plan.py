"""A clock plan for one spec on one board: the route, its settings, and what the display sees.

The core clock the plan aims at is the pixel clock divided by the core's
pixels_per_clock.  Two routes reach it from the board's oscillator:

* a PLL of the named family (:func:`~synccore.clocking.solve.solve`);
* without a PLL, the core runs on the board clock with a clock enable that
  is high on one cycle in ``divide`` (:func:`~synccore.clocking.solve.solve_enable`).

The reached clock is judged against a tolerance: the fit's own
``tolerance_percent`` when the spec was fitted to datasheet ranges and gives one,
else :data:`~synccore.clocking.solve.MONITOR_TOLERANCE` (VESA DMT, from memory); a
spec fitted to a datasheet clock range must also stay inside it.  When the best
route misses, :func:`synccore.clocking.adjust.find` looks for a raster whose clock
the route reaches, keeping line rate and refresh on target (the plan's
``adjustment``); :mod:`synccore.clocking.advice` writes it as a spec.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from decimal import Decimal
from fractions import Fraction

from synccore.clocking import adjust
from synccore.clocking.adjust import Adjustment
from synccore.clocking.families import FAMILIES, FAMILY_KEYS, Family
from synccore.clocking.solve import (
    MONITOR_TOLERANCE,
    TOLERANCE_SOURCE,
    EnableSetting,
    Route,
    Setting,
    solve,
    solve_enable,
)
from synccore.errors import ToolError
from synccore.model import Timing
from synccore.spec import Spec, ValueRange, parse_frequency

RUNNERS_UP = 3

__all__ = ["Adjustment", "ClockPlan", "Route", "make_plan", "tolerance_of"]


def tolerance_of(spec: Spec) -> tuple[Fraction, str]:
    """The tolerance a plan for ``spec`` assumes, and where it comes from."""
    if spec.fit is not None and spec.fit.tolerance is not None:
        return spec.fit.tolerance, "the spec's fit.tolerance_percent"
    return MONITOR_TOLERANCE, TOLERANCE_SOURCE


@dataclass(frozen=True)
class ClockPlan:
    """How the board's oscillator becomes the core clock of ``spec``."""

    spec: Spec
    f_board: Fraction
    family: Family | None  # None: the clock-enable route
    settings: tuple[Setting, ...]  # PLL route: best first; empty otherwise or if none is legal
    enable: EnableSetting | None  # clock-enable route
    adjustment: Adjustment | None  # offered only when the best route misses the tolerance
    tolerance: Fraction = MONITOR_TOLERANCE
    tolerance_source: str = TOLERANCE_SOURCE

    @property
    def timing(self) -> Timing:
        return Timing(self.spec)

    @property
    def target(self) -> Fraction:
        """The core clock the spec needs: pixel clock / pixels_per_clock."""
        return self.timing.core_clock_hz

    @property
    def best(self) -> Route | None:
        if self.family is None:
            return self.enable
        return self.settings[0] if self.settings else None

    @property
    def reached_pixel_hz(self) -> Fraction | None:
        """Pixel rate the display sees: the reached core rate times pixels_per_clock."""
        best = self.best
        return None if best is None else best.f_out * self.timing.ppc

    @property
    def line_rate_hz(self) -> Fraction | None:
        px = self.reached_pixel_hz
        return None if px is None else px / self.spec.horizontal.total

    @property
    def refresh_hz(self) -> Fraction | None:
        lr = self.line_rate_hz
        return None if lr is None else lr / self.spec.vertical.total

    @property
    def clock_range(self) -> ValueRange | None:
        """The datasheet's pixel clock range, when the spec was fitted to one."""
        return adjust.clock_range(self.spec)

    @property
    def within_clock_range(self) -> bool:
        """The reached pixel clock lies inside the datasheet's range (True without one)."""
        px, r = self.reached_pixel_hz, self.clock_range
        return px is not None and (r is None or r.holds(px))

    @property
    def within_tolerance(self) -> bool:
        """The best route reaches the pixel clock within the tolerance (and the datasheet's range)."""
        best = self.best
        return best is not None and abs(best.error) <= self.tolerance and self.within_clock_range


def make_plan(spec: Spec, *, f_board: Fraction, family: Family | None) -> ClockPlan:
    """Plan the core clock of ``spec`` from a board clock, through ``family``'s PLL or a ce."""
    target = Timing(spec).core_clock_hz
    if family is None:
        settings: tuple[Setting, ...] = ()
        enable: EnableSetting | None = solve_enable(f_board, target)
    else:
        settings = tuple(solve(family, f_board, target, count=1 + RUNNERS_UP))
        enable = None
    tolerance, source = tolerance_of(spec)
    plan = ClockPlan(spec, f_board, family, settings, enable, None, tolerance, source)
    if not plan.within_tolerance:
        found = adjust.find(spec, f_board, family, tolerance)
        if found is not None:
            plan = dataclasses.replace(plan, adjustment=found)
    return plan


def frequency_argument(value: object, subject: str = "board_clock_hz") -> Fraction:
    """A caller's frequency (number, Decimal or unit string) as an exact positive Fraction;
    :class:`ToolError` naming ``subject`` otherwise."""
    number = Fraction(value) if isinstance(value, Decimal) and value.is_finite() else value
    try:
        f = parse_frequency(number)
    except (ArithmeticError, ValueError):  # a float infinity or NaN
        f = None
    if f is None or f <= 0:
        raise ToolError(f'must be a frequency like "12MHz" or "27 MHz", got {value!r}',
                        subject=subject)  # fmt: skip
    return f


def family_argument(key: object) -> Family | None:
    """A caller's family key (or a :class:`Family`, or None for no PLL); :class:`ToolError`
    naming the choices otherwise."""
    if key is None or isinstance(key, Family):
        return key
    if not isinstance(key, str) or key not in FAMILIES:
        raise ToolError(f"unknown FPGA family {key!r}; choose from {', '.join(FAMILY_KEYS)}",
                        subject="family")  # fmt: skip
    return FAMILIES[key]
