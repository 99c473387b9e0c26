"""Will this display accept this timing?  A timing judged against what its EDID declares.

A display accepts a timing it lists (a detailed timing, an established or standard
timing, a CTA VIC) or, when it declares range limits, one whose refresh, line rate and
pixel clock fall inside them.  A pixel clock above the declared maximum is refused even
when the timing is listed.  Each finding is one sentence, so a user sees why.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Axis
from synccore.timings import modes
from synccore.timings.edid import Edid

CLOCK_TOLERANCE = Fraction(5, 1000)
"""A listed timing matches within ±0.5 % of its pixel clock (from memory: VESA DMT,
general timing requirements; also covers the DTD's 10 kHz steps)."""


@dataclass(frozen=True)
class Verdict:
    """``accepted`` and the findings behind it, one sentence each."""

    accepted: bool
    findings: tuple[str, ...]


def _close(a: Fraction, b: Fraction) -> bool:
    return abs(a - b) <= CLOCK_TOLERANCE * b


def _listed(e: Edid, clock: Fraction, h: Axis, v: Axis) -> str:
    """Where ``e`` lists this timing ("" when it does not)."""
    for d in e.all_detailed:
        if (d.horizontal, d.vertical) == (h, v) and _close(clock, Fraction(d.pixel_clock_hz)):
            return f"it is the EDID's detailed timing {d.name} ({d.where})"
    sources = {t.library: t.label for t in e.established + e.standard if t.library}
    sources.update({f"CTA VIC {s.vic}": f"VIC {s.vic}" for c in e.cta for s in c.videos})
    for m in modes.library():
        if m.interlaced:  # an interlaced mode is never the same timing as a progressive one
            continue
        names = [n.removesuffix(" (1000/1001)") for n in (m.source, *m.also)]
        names = [n for n in names if n in sources]
        if names and (m.horizontal, m.vertical) == (h, v) and _close(clock, m.pixel_clock_hz):
            return f"the EDID lists {sources[names[0]]} ({m.source}, {m.name})"
    return ""


def judge(e: Edid, clock: Fraction, h: Axis, v: Axis) -> Verdict:
    """Would the display that sent ``e`` accept this timing, and why."""
    line = clock / h.total
    refresh = line / v.total
    found: list[str] = []
    listed = _listed(e, clock, h, v)
    found.append(f"listed: {listed}" if listed else "not one of the timings the EDID lists")
    r = e.range_limits
    if r is None:
        if not listed:
            found.append("refused: not listed, and the EDID declares no range limits")
        return Verdict(bool(listed), tuple(found))
    inside = True
    checks = (("refresh", refresh, r.min_refresh_hz, r.max_refresh_hz, 1, "Hz"),
              ("line rate", line, r.min_line_rate_hz, r.max_line_rate_hz, 1000, "kHz"))
    for what, value, low, high, unit, name in checks:
        ok = low <= value <= high
        inside = inside and ok
        found.append(f"{what} {float(value / unit):.3f} {name} is "
                     f"{'inside' if ok else 'outside'} the declared "
                     f"{low // unit}-{high // unit} {name}")  # fmt: skip
    fast = r.max_pixel_clock_hz > 0 and clock > r.max_pixel_clock_hz
    if r.max_pixel_clock_hz:
        found.append(f"pixel clock {float(clock / 1_000_000):.3f} MHz is "
                     f"{'above' if fast else 'within'} the declared maximum "
                     f"{r.max_pixel_clock_hz // 1_000_000} MHz")  # fmt: skip
    accepted = not fast and (bool(listed) or inside)
    if not accepted:
        found.append("refused: " + ("too fast for the display's maximum pixel clock" if fast
                                    else "not listed and outside the range limits"))
    return Verdict(accepted, tuple(found))
