"""Choosing clock-synthesiser settings: the closest reachable frequency, and its runners-up.

The search is exact (fractions, no floating point) and complete over the
legal settings of a family: for every input divider whose phase-detector
frequency is legal, every multiplier whose VCO (or output) frequency is
legal is tried, and the output divider is taken from the neighbours of the
ideal ratio (feedback from the VCO) or as the one giving the highest legal
VCO (feedback from the output).  The output frequency moves monotonically
with the output divider, so no closer setting is missed.

Ranking: the smallest error first; among equal errors the higher VCO (lower
jitter, as Xilinx UG949 advises for MMCM settings), then the smaller dividers.

The no-PLL route divides a faster board clock with a clock enable: the core
advances on one cycle in ``divide``.
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.families import Family, ice40_filter_range

MONITOR_TOLERANCE = Fraction(5, 1000)
"""±0.5 % on the pixel clock: VESA DMT, general timing requirements (from memory)."""

TOLERANCE_SOURCE = "VESA DMT (from memory)"
"""Where :data:`MONITOR_TOLERANCE` comes from, as every output names it."""


def _plain(value: Fraction) -> int | Fraction:
    return int(value) if value.denominator == 1 else value


class _Reached:
    """The error of a reached frequency against the target; subclasses give both."""

    target: Fraction

    @property
    def f_out(self) -> Fraction:
        raise NotImplementedError

    @property
    def error(self) -> Fraction:
        """Relative error of the reached frequency: (reached - target) / target."""
        return (self.f_out - self.target) / self.target

    @property
    def ppm(self) -> Fraction:
        return self.error * 10**6


@dataclass(frozen=True)
class Setting(_Reached):
    """One legal setting of a family's synthesiser and the frequencies it gives."""

    family: Family
    f_in: Fraction
    target: Fraction
    input_ratio: Fraction
    multiplier: Fraction
    output_ratio: Fraction

    @property
    def f_pfd(self) -> Fraction:
        return self.f_in / self.input_ratio

    @property
    def f_out(self) -> Fraction:
        """The frequency reached.

        Feedback from the VCO: f_in * multiplier / (input divider * output divider);
        feedback from the output: f_in * multiplier / input divider.
        """
        if self.family.feedback == "vco":
            return self.f_in * self.multiplier / (self.input_ratio * self.output_ratio)
        return self.f_in * self.multiplier / self.input_ratio

    @property
    def f_vco(self) -> Fraction:
        if self.family.feedback == "vco":
            return self.f_pfd * self.multiplier
        return self.f_out * self.output_ratio

    def counters(self) -> dict[str, int | Fraction]:
        """Every divider under the vendor's parameter name, with the vendor's encoding."""
        fam = self.family
        return {
            fam.input_divider.param: _plain(fam.input_divider.value(self.input_ratio)),
            fam.multiplier.param: _plain(fam.multiplier.value(self.multiplier)),
            fam.output_divider.param: _plain(fam.output_divider.value(self.output_ratio)),
        }

    def parameters(self) -> dict[str, int | Fraction]:
        """The primitive's frequency parameters, as its instance takes them."""
        fam = self.family
        if fam.ratio_params is not None:
            ratio = self.f_out / self.f_in
            mul, div = fam.ratio_params
            return {mul: ratio.numerator, div: ratio.denominator}
        params = self.counters()
        if fam.key == "ice40":
            params["FILTER_RANGE"] = ice40_filter_range(self.f_pfd)
        return params

    def legal(self) -> bool:
        """Every intermediate frequency and ratio inside the family's documented limits."""
        fam = self.family
        return (
            self.input_ratio in fam.input_divider.ratios
            and self.multiplier in fam.multiplier.ratios
            and self.output_ratio in fam.output_divider.ratios
            and fam.input_range.holds(self.f_in)
            and fam.pfd_range.holds(self.f_pfd)
            and fam.vco_range.holds(self.f_vco)
            and fam.output_range.holds(self.f_out)
        )


def _rank(s: Setting) -> tuple[Fraction, Fraction, Fraction, Fraction, Fraction]:
    return (abs(s.f_out - s.target), -s.f_vco, s.input_ratio, s.multiplier, s.output_ratio)


def _between(values: tuple[Fraction, ...], low: Fraction | None, high: Fraction | None
             ) -> tuple[Fraction, ...]:  # fmt: skip
    """The sorted ``values`` within ``[low, high]`` (None: unbounded)."""
    lo = 0 if low is None else bisect_left(values, low)
    hi = len(values) if high is None else bisect_right(values, high)
    return values[lo:hi]


def _settings(
    fam: Family, f_in: Fraction, target: Fraction, window: tuple[Fraction, Fraction] | None,
    outputs: tuple[Fraction, ...] | None = None,
) -> list[Setting]:
    """Legal settings: those nearest ``target``, or (with a window) all with outputs inside it.

    Without a window, feedback from the VCO keeps, for every input divider and
    multiplier, the two output dividers around the ideal one; feedback from the
    output tries every multiplier (the output does not depend on the output
    divider, which is set for the highest legal VCO).  ``outputs`` narrows the output
    dividers tried (sorted, a subset of the family's), for a second output tied to them.
    """
    found: list[Setting] = []
    mults = fam.multiplier.ratios
    outs = fam.output_divider.ratios if outputs is None else outputs
    vco, out_r = fam.vco_range, fam.output_range
    for d in fam.input_divider.ratios:
        pfd = f_in / d
        if not fam.pfd_range.holds(pfd):
            continue
        if fam.feedback == "vco":
            for m in _between(mults, _div(vco.low, pfd), _div(vco.high, pfd)):
                f_vco = pfd * m
                if window is None:
                    at = bisect_left(outs, f_vco / target)
                    choices = outs[max(0, at - 1) : at + 1]
                else:
                    choices = _between(outs, f_vco / window[1], f_vco / window[0])
                found += [Setting(fam, f_in, target, d, m, o) for o in choices
                          if out_r.holds(f_vco / o)]  # fmt: skip
        else:
            low, high = out_r.low, out_r.high
            if window is not None:
                low = window[0] if low is None else max(low, window[0])
                high = window[1] if high is None else min(high, window[1])
            for m in _between(mults, _div(low, pfd), _div(high, pfd)):
                f_out = pfd * m
                top = len(_between(outs, None, _div(vco.high, f_out)))
                if top and vco.holds(f_out * outs[top - 1]):
                    found.append(Setting(fam, f_in, target, d, m, outs[top - 1]))
    return found


def _div(value: Fraction | None, by: Fraction) -> Fraction | None:
    return None if value is None else value / by


def _distinct(settings: list[Setting]) -> list[Setting]:
    """The best-ranked setting of every distinct output frequency, best first."""
    best: dict[Fraction, Setting] = {}
    for s in settings:
        seen = best.get(s.f_out)
        if seen is None or _rank(s) < _rank(seen):
            best[s.f_out] = s
    return sorted(best.values(), key=_rank)


def solve(fam: Family, f_in: Fraction, target: Fraction, *, count: int = 4) -> list[Setting]:
    """Up to ``count`` legal settings reaching distinct frequencies, closest to ``target`` first.

    Empty when the input clock is outside the family's input range or no
    legal setting exists.
    """
    if target <= 0 or not fam.input_range.holds(f_in):
        return []
    return _distinct(_settings(fam, f_in, target, None))[:count]


def solve_tied(fam: Family, f_in: Fraction, target: Fraction, *, factor: int,
               second: tuple[Fraction, ...], count: int = 4) -> list[Setting]:  # fmt: skip
    """As :func:`solve`, for a synthesiser with a second output tied to the first.

    The second output divides the same VCO by ``factor`` times the first's output
    divider, which must be one of the ``second`` ratios (the second divider's legal
    values).  Only output dividers allowing that are searched, so the result is the
    closest among settings whose second divider is legal too, not a filter of the
    unconstrained best.
    """
    if target <= 0 or not fam.input_range.holds(f_in):
        return []
    legal = set(second)
    outs = tuple(o for o in fam.output_divider.ratios if o * factor in legal)
    if not outs:
        return []
    return _distinct(_settings(fam, f_in, target, None, outs))[:count]


@dataclass(frozen=True)
class EnableSetting(_Reached):
    """The no-PLL route: the core runs on the board clock and advances one cycle in ``divide``."""

    f_board: Fraction
    target: Fraction
    divide: int

    @property
    def f_out(self) -> Fraction:
        """The rate at which the core advances: f_board / divide."""
        return self.f_board / self.divide


Route = Setting | EnableSetting
"""A way to the core clock: a PLL setting or a clock-enable division."""


def solve_enable(f_board: Fraction, target: Fraction) -> EnableSetting:
    """The clock-enable division closest to ``target`` (1: the board clock itself)."""
    if target <= 0 or f_board <= 0:
        raise ValueError("frequencies must be above 0")
    low = max(1, int(f_board // target))
    options = [low, low + 1]
    divide = min(options, key=lambda n: (abs(f_board / n - target), n))
    return EnableSetting(f_board, target, divide)


def reachable(fam: Family, f_in: Fraction, low: Fraction, high: Fraction) -> list[Setting]:
    """Every legal setting whose output lies in ``[low, high]``, one per distinct frequency.

    Used to look for a nearby clock when the target itself cannot be reached
    closely enough.  The settings' ``target`` is ``low``; callers replace it.
    """
    if not fam.input_range.holds(f_in) or low > high or high <= 0:
        return []
    return _distinct(_settings(fam, f_in, low, (low, high)))
