"""Import and export of the X.Org modeline line.

A modeline gives the pixel clock in MHz, then four horizontal positions
(display end, sync start, sync end, total) and four vertical ones, then flags::

    Modeline "1280x720" 74.25 1280 1390 1430 1650 720 725 730 750 +HSync +VSync

The leading ``Modeline`` keyword and the quoted name are optional on input.
Sync polarities are the ``+HSync``/``-HSync`` and ``+VSync``/``-VSync`` flags
(case-insensitive); a missing polarity is refused rather than guessed.
Interlaced and double-scan modes are refused: synccore cores are progressive.
"""

from __future__ import annotations

import re
import shlex
from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Axis
from synccore.units import exact_number, fixed

_REFUSED_FLAGS = {"interlace": "interlaced", "doublescan": "double-scan"}
_IGNORED_FLAGS = ("composite", "+csync", "-csync")


class ModelineError(ValueError):
    """A line that is not a usable modeline; the message says why."""


@dataclass(frozen=True)
class Modeline:
    """A parsed modeline: its name (may be empty), exact clock and both axes."""

    name: str
    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis


def _axis(what: str, nums: list[int], polarity: str) -> Axis:
    active, start, end, total = nums
    if not 0 < active <= start <= end <= total:
        raise ModelineError(
            f"{what} positions must rise: 0 < display <= sync start <= sync end <= total, "
            f"got {active} {start} {end} {total}"
        )
    if end == start:
        raise ModelineError(f"{what} sync has no width, got start {start} and end {end}")
    return Axis(active, start - active, end - start, total - end, polarity)


def parse(text: str) -> Modeline:
    """Parse one modeline; raise :class:`ModelineError` naming what is wrong."""
    try:
        words = shlex.split(text.strip(), posix=True)
    except ValueError as exc:
        raise ModelineError(f"cannot split the line: {exc}") from None
    if words and words[0].lower() == "modeline":
        words = words[1:]
    name = ""
    numeric = [bool(re.fullmatch(r"[0-9]+(?:\.[0-9]*)?", w)) for w in words]
    if words and not numeric[0] and all(numeric[1:10]) and len(words) >= 10:
        name = words.pop(0)  # a name, quoted or not, before the clock
    if len(words) < 9:
        raise ModelineError(
            "expected a clock in MHz and eight numbers (hdisp hsyncstart hsyncend htotal "
            f"vdisp vsyncstart vsyncend vtotal), got {len(words)} values"
        )
    clock_mhz = exact_number(words[0])
    if clock_mhz is None:
        raise ModelineError(f"clock must be a finite number in MHz, got {words[0]!r}")
    if clock_mhz <= 0:
        raise ModelineError(f"clock must be above 0 MHz, got {words[0]}")
    try:
        nums = [int(w) for w in words[1:9]]
    except ValueError:
        got = " ".join(words[1:9])
        raise ModelineError(f"positions must be whole numbers, got {got}") from None
    flags = [w.lower() for w in words[9:]]
    h_pol = v_pol = ""
    for flag in flags:
        if flag in ("+hsync", "-hsync"):
            h_pol = "positive" if flag[0] == "+" else "negative"
        elif flag in ("+vsync", "-vsync"):
            v_pol = "positive" if flag[0] == "+" else "negative"
        elif flag in _REFUSED_FLAGS:
            raise ModelineError(
                f"{_REFUSED_FLAGS[flag]} modes are not supported, got flag {flag!r}")
        elif flag in _IGNORED_FLAGS:
            continue
        else:
            raise ModelineError(f"unknown flag {flag!r}")
    missing = [w for w, p in (("+HSync or -HSync", h_pol), ("+VSync or -VSync", v_pol)) if not p]
    if missing:
        raise ModelineError(f"sync polarity must be given ({' and '.join(missing)})")
    return Modeline(
        name=name,
        pixel_clock_hz=Fraction(clock_mhz) * 1_000_000,
        horizontal=_axis("horizontal", nums[0:4], h_pol),
        vertical=_axis("vertical", nums[4:8], v_pol),
    )


def clock_mhz_text(pixel_clock_hz: Fraction) -> str:
    """The clock in MHz, exact when the clock is a whole number of Hz (6 decimals at most),
    with trailing zeros trimmed to no fewer than 3 decimals."""
    text = fixed(pixel_clock_hz / 1_000_000, 6)
    whole, _, frac = text.partition(".")
    frac = frac.rstrip("0").ljust(3, "0")
    return f"{whole}.{frac}"


def format_line(name: str, pixel_clock_hz: Fraction, h: Axis, v: Axis) -> str:
    """One ``Modeline`` line for a timing.  Clocks finer than 1 Hz are rounded to 1 Hz."""
    def positions(a: Axis) -> str:
        return f"{a.active} {a.sync_start} {a.sync_stop} {a.total}"

    def flag(a: Axis, which: str) -> str:
        return ("+" if a.sync_polarity == "positive" else "-") + which

    return (f'Modeline "{name}" {clock_mhz_text(pixel_clock_hz)} {positions(h)} '
            f"{positions(v)} {flag(h, 'HSync')} {flag(v, 'VSync')}")  # fmt: skip
