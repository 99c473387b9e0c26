"""Planning a DVI link's two clocks from the board's oscillator through one PLL.

Every link uses DDR outputs: the serial clock is 5 x the pixel clock (10 bits per pixel
and lane, two per serial clock cycle), and the core clock is pixel clock /
pixels_per_clock.  Both come from the same VCO, so they stay in phase:

* ECP5 (EHXPLLL): CLKOP = serial clock (feedback from CLKOP), CLKOS = core clock, with
  CLKOS_DIV = CLKOP_DIV x 5 x ppc (at most 128);
* 7 series (MMCME2_BASE / PLLE2_BASE): CLKOUT0 = serial, CLKOUT1 = core, whole dividers
  with CLKOUT1_DIVIDE = 5 x CLKOUT0 divider (ppc must be 1);
* Gowin (rPLL): CLKOUT = serial; the vendor's CLKDIV (DIV_MODE "5") makes the pixel clock
  (ppc must be 1);
* iCE40 (SB_PLL40_CORE): one output, the serial clock; everything runs on it and the core
  advances on a clock enable one cycle in 5 x ppc (the spec needs core.clock_enable);
* Cyclone IV (altpll): clk0 = serial, clk1 = core (post-scale counter C1 = 5 x ppc x C0).

The search (:func:`synccore.clocking.solve.solve_tied`) looks only at settings whose
second divider is legal too.  The reached pixel clock is judged against the same
tolerance as a core clock plan (:func:`synccore.clocking.plan.tolerance_of`), and the
bit rate per lane against the family's output path rating
(:data:`synccore.clocking.link_io.IO_LIMITS`); when it is exceeded the plan names the
nearest library modes that fit.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.families import Family
from synccore.clocking.families import family as family_named
from synccore.clocking.link_io import CORE_TAPS, IO_LIMITS, CoreTap, IoLimit
from synccore.clocking.plan import tolerance_of
from synccore.clocking.solve import Setting, solve, solve_tied
from synccore.errors import Problem, SpecError
from synccore.model import Timing
from synccore.spec import Spec
from synccore.timings.modes import Mode, library
from synccore.units import hz

SERIAL_FACTOR = 5
"""Serial clock / pixel clock: 10 bits per pixel, two per cycle on DDR outputs (contract)."""

BITS_PER_PIXEL = 10
"""Bits per pixel on each TMDS lane (DVI 1.0 sec. 3.2: 8 bits become a 10-bit symbol)."""

RUNNERS_UP = 3
SUGGESTIONS = 3

__all__ = ["BITS_PER_PIXEL", "SERIAL_FACTOR", "LinkPlan", "link_problems", "plan_link"]


@dataclass(frozen=True)
class LinkPlan:
    """How the board's oscillator becomes a DVI link's serial and core clocks.

    ``settings``: the PLL settings for the serial clock, best first (empty when none is
    legal); ``core_factor`` = serial clock / core clock = 5 x ppc; ``core_param`` the
    vendor's name of the core clock's divider (None on iCE40, where a ce divides).
    The reached clocks are None when no setting exists.  ``bit_rate_hz`` is 10 x the
    spec's pixel clock: the rate per lane the link needs, judged against ``io``.
    """

    spec: Spec
    f_board: Fraction
    family: Family
    settings: tuple[Setting, ...]
    core_tap: CoreTap
    core_factor: int
    serial_hz: Fraction | None
    core_hz: Fraction | None
    pixel_hz: Fraction | None
    ppm: Fraction | None
    bit_rate_hz: Fraction
    io: IoLimit
    fits_io: bool
    tolerance: Fraction
    tolerance_source: str
    within_tolerance: bool
    suggestions: tuple[str, ...]
    problems: tuple[Problem, ...]  # spec changes the link needs (iCE40: core.clock_enable)

    @property
    def setting(self) -> Setting | None:
        return self.settings[0] if self.settings else None

    @property
    def pixels_per_clock(self) -> int:
        return self.spec.core.pixels_per_clock

    @property
    def wanted_pixel_hz(self) -> Fraction:
        return Timing(self.spec).pixel_clock_hz

    @property
    def core_divider(self) -> Fraction | None:
        """The core clock's divider value: of the VCO (second output), 5 (CLKDIV), or the ce."""
        s = self.setting
        if s is None:
            return None
        if self.core_tap.kind == "output":
            return s.output_ratio * self.core_factor
        return Fraction(self.core_factor)

    @property
    def io_limit_hz(self) -> Fraction:
        return self.io.rate

    @property
    def ok(self) -> bool:
        """A setting exists, within tolerance, inside the I/O rating, with nothing to change."""
        return self.within_tolerance and self.fits_io and not self.problems


def _family(fam: Family | str) -> Family:
    return family_named(fam) if isinstance(fam, str) else fam


def link_problems(spec: Spec, family: Family | str) -> list[Problem]:
    """What the spec must change for a DVI link on ``family``, each as a located problem."""
    fam = _family(family)
    tap = CORE_TAPS[fam.key]
    ppc = spec.core.pixels_per_clock
    out: list[Problem] = []
    if tap.ppc_one and ppc != 1:
        out.append(Problem(spec.location("core.pixels_per_clock"), "core.pixels_per_clock",
                           f"must be 1 for a DVI link on {fam.key} ({tap.why}), got {ppc}"))
    if tap.kind == "enable" and not spec.core.clock_enable:
        serial = Timing(spec).pixel_clock_hz * SERIAL_FACTOR
        out.append(Problem(
            spec.location("core.clock_enable"), "core.clock_enable",
            f"must be true for a DVI link on {fam.key} (the core runs on the "
            f"{hz(serial)} serial clock and advances on a ce one cycle in "
            f"{SERIAL_FACTOR * ppc}), got false"))  # fmt: skip
    return out


def _settings(fam: Family, tap: CoreTap, f_board: Fraction, serial: Fraction,
              factor: int) -> tuple[Setting, ...]:  # fmt: skip
    count = 1 + RUNNERS_UP
    if tap.kind == "output":
        found = solve_tied(fam, f_board, serial, factor=factor, second=tap.ratios, count=count)
        # the second output must be a legal output frequency too
        found = [s for s in found if fam.output_range.holds(s.f_out / factor)]
        return tuple(found)
    return tuple(solve(fam, f_board, serial, count=count))


def plan_link(spec: Spec, *, f_board: Fraction, family: Family | str) -> LinkPlan:
    """Plan the serial and core clocks of a DVI link for ``spec`` from a board clock.

    Raises :class:`SpecError` when the family cannot carry the spec's pixels_per_clock;
    a spec without the clock enable iCE40 needs is planned, with the problem in
    ``plan.problems``.
    """
    fam = _family(family)
    problems = link_problems(spec, fam)
    refused = [p for p in problems if p.field == "core.pixels_per_clock"]
    if refused:
        raise SpecError(refused)
    tap = CORE_TAPS[fam.key]
    ppc = spec.core.pixels_per_clock
    factor = SERIAL_FACTOR * ppc
    wanted = Timing(spec).pixel_clock_hz
    settings = _settings(fam, tap, f_board, wanted * SERIAL_FACTOR, factor)
    best = settings[0] if settings else None
    serial = None if best is None else best.f_out
    pixel = None if serial is None else serial / SERIAL_FACTOR
    tolerance, source = tolerance_of(spec)
    bit_rate = wanted * BITS_PER_PIXEL
    io = IO_LIMITS[fam.key]
    fits = bit_rate <= io.rate
    return LinkPlan(
        spec=spec, f_board=f_board, family=fam, settings=settings, core_tap=tap,
        core_factor=factor, serial_hz=serial,
        core_hz=None if serial is None else serial / factor, pixel_hz=pixel,
        ppm=None if best is None else best.ppm, bit_rate_hz=bit_rate, io=io, fits_io=fits,
        tolerance=tolerance, tolerance_source=source,
        within_tolerance=best is not None and abs(best.error) <= tolerance,
        suggestions=() if fits else suggest_modes(spec, io.rate),
        problems=tuple(problems),
    )  # fmt: skip


def _fits(m: Mode, limit: Fraction) -> bool:
    return m.pixel_clock_hz * BITS_PER_PIXEL <= limit


def suggest_modes(spec: Spec, limit: Fraction, count: int = SUGGESTIONS) -> tuple[str, ...]:
    """Library modes whose bit rate per lane fits ``limit``, nearest to the spec first.

    First the spec's active size at a lower refresh (highest first), then the largest
    modes below the limit (most active pixels, then the highest refresh); by name, once.
    """
    w, h = spec.horizontal.active, spec.vertical.active
    refresh = Timing(spec).refresh_hz
    modes = [m for m in library() if _fits(m, limit) and not m.interlaced]
    same = sorted((m for m in modes if (m.horizontal.active, m.vertical.active) == (w, h)
                   and m.refresh_hz < refresh), key=lambda m: -m.refresh_hz)  # fmt: skip
    largest = sorted(modes, key=lambda m: (-m.horizontal.active * m.vertical.active,
                                           -m.refresh_hz))  # fmt: skip
    names: list[str] = []
    for m in [*same, *largest]:
        if m.name not in names:
            names.append(m.name)
    return tuple(names[:count])
