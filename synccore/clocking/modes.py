"""Several display modes from one board clock: one PLL configuration for all, or one each.

A board that drives one display at several resolutions switches between their
pixel clocks.  :func:`plan_modes` plans every mode on its own
(:func:`~synccore.clocking.plan.make_plan`) and then asks whether one
configuration serves them all:

* **one PLL output** ``F`` such that every mode's core clock is ``F / d`` for a
  whole clock-enable divide ``d`` within that mode's tolerance (the tolerance
  :func:`~synccore.clocking.plan.tolerance_of` gives, and a fitted spec's
  datasheet clock range).  The core then runs at ``F`` with a ``ce`` input high on
  one cycle in ``d``; only the divide changes between modes, and that is a
  register, not a PLL setting.
* without a family (the clock-enable route), ``F`` is the board clock itself and
  each mode's divide is its own plan's.

The search (:func:`shared_clock`) walks the multiples ``D`` of the fastest mode's
core clock upwards (``F`` near 1x, 2x, ... that clock) and, within the band of
``D``, every output the family's PLL reaches from the board clock
(:func:`~synccore.clocking.solve.reachable`, which keeps to the family's input,
PFD, VCO, divider and output limits), up to ``max_core_clock`` (default the
PLL's output limit).  The lowest ``D`` that serves every mode wins, because the
core and all that runs on its clock must close timing at ``F``; within it, the
smallest worst error relative to each mode's tolerance, then the solver's own
order (higher VCO, smaller dividers).

When no ``F`` serves, each mode keeps its own PLL setting, and switching between
them at run time needs dynamic reconfiguration of the PLL, which synccore does not
emit; :data:`RECONFIGURATION` says in general terms what each family offers.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass
from decimal import Decimal
from fractions import Fraction

from synccore.clocking import adjust
from synccore.clocking.families import FAMILY_KEYS, Family
from synccore.clocking.plan import ClockPlan, family_argument, frequency_argument, make_plan
from synccore.clocking.solve import EnableSetting, Setting, reachable
from synccore.errors import ToolError
from synccore.spec import Spec
from synccore.units import hz

__all__ = ["RECONFIGURATION", "ModesPlan", "SharedClock", "plan_modes", "shared_clock"]

RECONFIGURATION: dict[str, str] = {
    "ice40": "from memory, the SB_PLL40 dividers are fixed when the device is configured (its "
             "dynamic input moves only a delay line), so another mode means another "
             "configuration image or another PLL; see Lattice TN1251",
    "ecp5": "from memory, the EHXPLLL moves its output phase at run time through ports; for "
            "changing its dividers see Lattice FPGA-TN-02200 (ECP5 sysCLOCK PLL guide)",
    "xc7-mmcm": "from memory, the MMCM's dynamic reconfiguration port (DRP) rewrites its "
                "dividers at run time; see Xilinx UG472 and XAPP888",
    "xc7-pll": "from memory, the PLL's dynamic reconfiguration port (DRP) rewrites its "
               "dividers at run time; see Xilinx UG472 and XAPP888",
    "gowin": "from memory, the rPLL can take its dividers from input ports instead of "
             "parameters (its dynamic mode); see Gowin UG286",
    "cyclone": "from memory, the PLL's counters can be rewritten at run time through a serial "
               "scan chain (ALTPLL_RECONFIG); see the Cyclone IV handbook, PLL reconfiguration",
}  # fmt: skip
"""What each family offers for changing its PLL at run time, in general terms (from memory)."""

if tuple(RECONFIGURATION) != FAMILY_KEYS:  # pragma: no cover - caught by every test run
    raise AssertionError("RECONFIGURATION must name every family, in order")


@dataclass(frozen=True)
class SharedClock:
    """One clock ``f_clock`` that serves every mode through a clock-enable divide each."""

    f_clock: Fraction
    setting: Setting | None  # the PLL setting making f_clock; None: the board clock itself
    enables: tuple[EnableSetting, ...]  # per mode, in the order of the specs
    tolerances: tuple[Fraction, ...]

    @property
    def divides(self) -> tuple[int, ...]:
        return tuple(e.divide for e in self.enables)

    @property
    def worst(self) -> Fraction:
        """The largest error of any mode as a share of its own tolerance (at most 1)."""
        return max(abs(e.error) / t for e, t in zip(self.enables, self.tolerances, strict=True))


@dataclass(frozen=True)
class ModesPlan:
    """Every mode's own plan, and the one clock that serves them all when there is one."""

    plans: tuple[ClockPlan, ...]
    f_board: Fraction
    family: Family | None  # None: the clock-enable route from the board clock
    max_core_clock: Fraction | None  # the highest F searched (PLL route); None: no bound
    max_core_clock_source: str
    shared: SharedClock | None
    alone: tuple[SharedClock | None, ...] = ()
    """Per mode, when its own plan misses and no clock serves every mode: a PLL output with a
    clock-enable divide that serves that mode alone (the single-mode plan tries none), else None."""

    @property
    def specs(self) -> tuple[Spec, ...]:
        return tuple(p.spec for p in self.plans)

    def own(self, index: int) -> Setting | EnableSetting | None:
        """Mode ``index``'s own route: its divide of a PLL output serving it alone, else its plan's."""
        alone = self.alone[index] if self.alone else None
        return alone.enables[0] if alone is not None else self.plans[index].best

    def own_setting(self, index: int) -> Setting | None:
        """The PLL setting of mode ``index``'s own route (None on the clock-enable route)."""
        alone = self.alone[index] if self.alone else None
        best = alone.setting if alone is not None else self.plans[index].best
        return best if isinstance(best, Setting) else None

    @property
    def same_clock(self) -> bool:
        """Every mode wants the same core clock: one setting trivially serves them all."""
        return len({p.target for p in self.plans}) == 1

    @property
    def verdict(self) -> str:
        """``common``: one configuration serves every mode (``shared``);
        ``reconfigure``: each mode needs its own PLL setting (dynamic reconfiguration);
        ``outside``: no route reaches some mode within its tolerance, and a change of
        PLL setting would not help (the clock-enable route, or one setting for all)."""
        if self.shared is not None:
            return "common"
        keys = {_key(self.own_setting(i)) for i in range(len(self.plans))}
        if self.family is not None and len(keys) > 1:
            return "reconfigure"
        return "outside"

    @property
    def outside(self) -> tuple[ClockPlan, ...]:
        """The modes no route of their own reaches within tolerance (each may offer an adjustment)."""
        return tuple(p for i, p in enumerate(self.plans)
                     if not p.within_tolerance and not (self.alone and self.alone[i]))  # fmt: skip

    @property
    def needs_clock_enable(self) -> tuple[Spec, ...]:
        """Modes whose route divides by more than 1 (the shared clock's, else their own) and
        whose core has no ce input."""
        routes = self.shared.enables if self.shared else [self.own(i) for i in range(len(self.plans))]
        return tuple(s for s, r in zip(self.specs, routes, strict=True)
                     if isinstance(r, EnableSetting) and r.divide > 1
                     and not s.core.clock_enable)  # fmt: skip


def _key(setting: Setting | None) -> object:
    return None if setting is None else tuple(sorted(setting.parameters().items()))


def _divide(f_clock: Fraction, target: Fraction) -> EnableSetting:
    """The whole divide of ``f_clock`` closest to ``target`` (the smaller on a tie)."""
    low = max(1, int(f_clock // target))
    best = min((low, low + 1), key=lambda d: (abs(f_clock / d - target), d))
    return EnableSetting(f_clock, target, best)


def _serving(plans: Sequence[ClockPlan], f_clock: Fraction) -> tuple[EnableSetting, ...] | None:
    """Each mode's divide of ``f_clock``, or None when one misses its tolerance or range."""
    enables = []
    for p in plans:
        e = _divide(f_clock, p.target)
        r = adjust.clock_range(p.spec)
        if abs(e.error) > p.tolerance or (r is not None and not r.holds(e.f_out * p.timing.ppc)):
            return None
        enables.append(e)
    return tuple(enables)


def _shared(plans: Sequence[ClockPlan], f_clock: Fraction, setting: Setting | None
            ) -> SharedClock | None:  # fmt: skip
    enables = _serving(plans, f_clock)
    if enables is None:
        return None
    return SharedClock(f_clock, setting, enables, tuple(p.tolerance for p in plans))


def _order(c: SharedClock) -> tuple[Fraction, ...]:
    s = c.setting
    assert s is not None
    return (c.worst, -s.f_vco, s.input_ratio, s.multiplier, s.output_ratio)


def shared_clock(plans: Sequence[ClockPlan], family: Family, f_board: Fraction,
                 max_core_clock: Fraction) -> SharedClock | None:  # fmt: skip
    """The PLL output that serves every mode of ``plans`` with a whole divide each, if any.

    The search is the module's: the multiples ``D`` of the fastest core clock in
    turn, every reachable output in the tolerance band of ``D`` times that clock
    (at most ``max_core_clock``), the first ``D`` with a serving output wins, and
    within it the smallest worst error relative to tolerance.
    """
    fastest = max(plans, key=lambda p: (p.target, -p.tolerance))
    if len({p.target for p in plans}) == 1 and isinstance(fastest.best, Setting):
        trivial = _shared(plans, fastest.best.f_out, fastest.best)
        if trivial is not None:
            return trivial
    t, tol = fastest.target, fastest.tolerance
    multiple = 1
    while multiple * t * (1 - tol) <= max_core_clock:
        ideal = multiple * t
        low, high = ideal * (1 - tol), min(ideal * (1 + tol), max_core_clock)
        found = [c for s in reachable(family, f_board, low, high)
                 if (c := _shared(plans, s.f_out, dataclasses.replace(s, target=ideal)))]
        if found:
            return min(found, key=_order)
        multiple += 1
    return None


def _specs(specs: object) -> tuple[Spec, ...]:
    if isinstance(specs, (Spec, str, bytes)) or not isinstance(specs, Sequence):
        raise TypeError(f"specs must be a sequence of Spec objects, like [a, b], got {specs!r}")
    if not specs or not all(isinstance(s, Spec) for s in specs):
        raise TypeError("specs must be a non-empty sequence of Spec objects")
    return tuple(specs)


def plan_modes(
    specs: Sequence[Spec],
    board_clock: int | float | Fraction | Decimal | str,
    family: str | Family | None,
    *,
    max_core_clock_hz: int | float | Fraction | Decimal | str | None = None,
) -> ModesPlan:
    """Plan every mode of ``specs`` from one board clock, and find one clock for all if any.

    ``board_clock`` and ``family`` are as :func:`synccore.api.plan_clock` takes them
    (a family key or ``None`` for the clock-enable route); ``max_core_clock_hz``
    bounds the shared PLL output searched (default the family's PLL output limit; it
    cannot apply to the clock-enable route, where the core runs at the board clock).

    Raises :class:`ToolError` (with ``subject`` ``board_clock_hz``, ``family`` or
    ``max_core_clock_hz``) for a bad frequency, an unknown family, a bound without a
    family or below the fastest mode's core clock; ``TypeError`` when ``specs`` is not a
    non-empty sequence of :class:`Spec`.
    """
    modes = _specs(specs)
    f_board = frequency_argument(board_clock, "board_clock_hz")
    fam = family_argument(family)
    bound = None if max_core_clock_hz is None else frequency_argument(max_core_clock_hz,
                                                               "max_core_clock_hz")  # fmt: skip
    plans = tuple(make_plan(s, f_board=f_board, family=fam) for s in modes)
    if fam is None:
        if bound is not None:
            raise ToolError("applies to a PLL only: on the clock-enable route the core runs at "
                            "the board clock", subject="max_core_clock_hz")  # fmt: skip
        enables = tuple(p.enable for p in plans if p.enable is not None)
        shared = (SharedClock(f_board, None, enables, tuple(p.tolerance for p in plans))
                  if all(p.within_tolerance for p in plans) else None)  # fmt: skip
        return ModesPlan(plans, f_board, None, None, "", shared)
    fastest = max(plans, key=lambda p: p.target)
    if bound is not None and bound < fastest.target:
        raise ToolError(f"must be at least the fastest mode's core clock, {hz(fastest.target)} "
                        f"({fastest.spec.name}), got {hz(bound)}",
                        subject="max_core_clock_hz")  # fmt: skip
    limit, source = fam.output_range.high, f"the {fam.primitive} output limit"
    if bound is not None and (limit is None or bound < limit):
        limit, source = bound, "the maximum core clock given"
    if limit is None:  # pragma: no cover - every family states an output limit
        raise AssertionError(fam.key)
    shared = shared_clock(plans, fam, f_board, limit)
    alone = () if shared is not None else tuple(
        None if p.within_tolerance else shared_clock([p], fam, f_board, limit) for p in plans)
    return ModesPlan(plans, f_board, fam, limit, source, shared, alone)

