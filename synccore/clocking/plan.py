"""A clock plan for one spec on one board: the route, its settings, and what the display sees.

The core clock the plan aims at is the pixel clock divided by the core's
pixels_per_clock.  Two routes reach it from the board's oscillator:

* a PLL of the named family (:func:`~synccore.clocking.solve.solve`);
* without a PLL, the core runs on the board clock with a clock enable that
  is high on one cycle in ``divide`` (:func:`~synccore.clocking.solve.solve_enable`).

The reached clock is judged against :data:`~synccore.clocking.solve.MONITOR_TOLERANCE`.
When it misses, the plan looks for a horizontal total close to the spec's
(active pixels and sync width kept, each porch changed by at most
:data:`PORCH_SHARE` of its width) whose clock the route can reach, so that
line rate and refresh stay on target: the trade's usual trick.  The smallest
refresh error wins, except that errors below :data:`GOOD_ENOUGH` count as
equal and then the smallest change of the total wins.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.families import Family
from synccore.clocking.solve import (
    MONITOR_TOLERANCE,
    EnableSetting,
    Setting,
    reachable,
    solve,
    solve_enable,
)
from synccore.model import Timing
from synccore.spec import Spec

PORCH_SHARE = Fraction(1, 4)
"""A suggested adjustment changes each horizontal porch by at most this share of its width."""

GOOD_ENOUGH = Fraction(100, 10**6)
"""Refresh errors below 100 ppm count as equal, and the smallest porch change wins among them:
closer is pointless, as board oscillators themselves are typically specified to ±50-100 ppm
(crystal oscillator data sheets, from memory)."""

RUNNERS_UP = 3

Route = Setting | EnableSetting


@dataclass(frozen=True)
class Adjustment:
    """A horizontal total the route can reach a clock for, keeping line rate and refresh."""

    front_porch: int
    back_porch: int
    h_total: int
    pixel_clock_hz: Fraction  # the pixel clock that would keep refresh exactly on target
    route: Route  # the best setting for that clock (its target is the core clock)
    refresh_hz: Fraction  # refresh actually reached
    refresh_error: Fraction  # relative to the spec's refresh


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
    def within_tolerance(self) -> bool:
        best = self.best
        return best is not None and abs(best.error) <= self.tolerance


def make_plan(spec: Spec, *, f_board: Fraction, family: Family | None) -> ClockPlan:
    """Plan the core clock of ``spec`` from a board clock, through ``family``'s PLL or a ce."""
    target = Timing(spec).core_clock_hz
    if family is None:
        settings: tuple[Setting, ...] = ()
        enable: EnableSetting | None = solve_enable(f_board, target)
    else:
        settings = tuple(solve(family, f_board, target, count=1 + RUNNERS_UP))
        enable = None
    plan = ClockPlan(spec, f_board, family, settings, enable, None)
    if not plan.within_tolerance:
        adjustment = _adjust(spec, f_board, family)
        best = plan.best
        # offered only when it brings refresh closer than the plain route does
        if adjustment is not None and (
            best is None or abs(adjustment.refresh_error) < abs(best.error)
        ):
            plan = dataclasses.replace(plan, adjustment=adjustment)
    return plan


def _porch_moves(width: int, step: int) -> range:
    reach = int(width * PORCH_SHARE) // step * step
    return range(-reach, reach + 1, step)


def _adjust(spec: Spec, f_board: Fraction, family: Family | None) -> Adjustment | None:
    """The nearest horizontal total whose exactly-scaled clock the route reaches best."""
    t = Timing(spec)
    h = spec.horizontal
    n = t.ppc
    # every total reachable by moving the porches, with the most even split
    splits: dict[int, tuple[int, int]] = {}
    for df in _porch_moves(h.front_porch, n):
        for db in _porch_moves(h.back_porch, n):
            old = splits.get(df + db)
            if old is None or abs(df - db) < abs(old[0] - old[1]):
                splits[df + db] = (df, db)
    if not splits:
        return None
    deltas = sorted(splits)
    refresh = t.refresh_hz
    v_total = spec.vertical.total
    # the core clocks that keep refresh exactly on target, over the span of totals
    low = refresh * (h.total + deltas[0]) * v_total / n
    high = refresh * (h.total + deltas[-1]) * v_total / n
    routes: list[Route]
    if family is None:
        top = int(f_board // low)
        bottom = max(1, -(-f_board // high))  # ceil
        routes = [
            EnableSetting(f_board, low, k)
            for k in range(int(bottom), top + 1)
            if low <= f_board / k <= high
        ]
    else:
        span = (high - low) / 2  # tolerate a clock between two totals
        routes = list(reachable(family, f_board, low - span, high + span))
    best: tuple[tuple[Fraction, int, Fraction, Fraction], Adjustment] | None = None
    for r in routes:
        exact = r.f_out * n / (refresh * v_total)  # the total that would be exactly on target
        below = int(exact // n) * n
        for total in (below, below + n):
            delta = total - h.total
            if delta not in splits:
                continue
            reached = r.f_out * n / (total * v_total)
            err = (reached - refresh) / refresh
            vco = r.f_vco if isinstance(r, Setting) else Fraction(0)
            key = (max(abs(err), GOOD_ENOUGH), abs(delta), abs(err), -vco)
            if best is None or key < best[0]:
                df, db = splits[delta]
                new_px = refresh * total * v_total
                best = (key, Adjustment(
                    front_porch=h.front_porch + df,
                    back_porch=h.back_porch + db,
                    h_total=total,
                    pixel_clock_hz=new_px,
                    route=dataclasses.replace(r, target=new_px / n),
                    refresh_hz=reached,
                    refresh_error=err,
                ))  # fmt: skip
    return None if best is None else best[1]
