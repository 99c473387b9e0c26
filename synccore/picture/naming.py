"""Naming the standard mode a monitor would take the measured syncs for.

A mode is named when its line rate and refresh are within :data:`RATE_TOLERANCE`
of the measured ones and its lines per frame, sync polarities, vsync lines and
hsync width (within :data:`WIDTH_TOLERANCE`) agree.  Otherwise the nearest mode
*of the picture's size* (the size of the de region, when de is seen) is named
with what differs; a mode of another size is never offered as the nearest.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.spec import Spec
from synccore.timings.modes import Mode, library

RATE_TOLERANCE = 0.01
"""Relative difference in line rate and refresh still taken as the same mode (1 %)."""
WIDTH_TOLERANCE = 0.05
"""Relative difference in hsync pulse width still taken as the same mode."""


@dataclass(frozen=True)
class Measured:
    """What the syncs (and de, when seen) told the monitor, as the naming needs it."""

    period_s: float
    line_rate_hz: float
    refresh_hz: float
    lines_per_frame: int
    hsync_polarity: str
    vsync_polarity: str
    hsync_cycles: int
    vsync_lines: int | None
    size: tuple[int, int] | None  # the de region's width and lines, when de is seen


@dataclass(frozen=True)
class Difference:
    """How far a mode is from what was measured."""

    rates_agree: bool  # line rate, refresh and lines per frame
    syncs_agree: bool  # polarities and widths
    score: float
    why: str  # "it has ...", empty when everything agrees


def difference(m: Mode, got: Measured) -> Difference:
    """Compare one library mode with the measured figures."""
    dl = abs(got.line_rate_hz / float(m.line_rate_hz) - 1)
    dr = abs(got.refresh_hz / float(m.refresh_hz) - 1)
    dw = abs(got.hsync_cycles * got.period_s / (m.horizontal.sync / float(m.pixel_clock_hz)) - 1)
    rates, syncs = [], []
    if dl > RATE_TOLERANCE:
        rates.append(f"line rate {float(m.line_rate_hz) / 1e3:.3f} kHz")
    if dr > RATE_TOLERANCE:
        rates.append(f"refresh {float(m.refresh_hz):.3f} Hz")
    if m.vertical.total != got.lines_per_frame:
        rates.append(f"{m.vertical.total} lines per frame")
    if m.horizontal.sync_polarity != got.hsync_polarity:
        syncs.append(f"hsync {m.horizontal.sync_polarity}")
    if m.vertical.sync_polarity != got.vsync_polarity:
        syncs.append(f"vsync {m.vertical.sync_polarity}")
    if m.vertical.sync != got.vsync_lines:
        syncs.append(f"vsync {m.vertical.sync} lines")
    if dw > WIDTH_TOLERANCE:
        syncs.append(f"hsync {m.horizontal.sync} pixels")
    why = rates + syncs
    return Difference(not rates, not syncs, dl + dr + dw + 0.5 * len(why),
                      "it has " + ", ".join(why) if why else "")  # fmt: skip


@dataclass(frozen=True)
class Naming:
    """The outcome: a mode (and the others it cannot be told from), or the nearest of the size."""

    mode: Mode | None = None
    also: tuple[Mode, ...] = ()
    nearest: Mode | None = None
    nearest_why: str = ""
    nearest_rates_agree: bool = False


def name_mode(got: Measured, modes: tuple[Mode, ...]) -> Naming:
    """The mode a monitor would lock to, or the nearest of the measured size with what differs."""
    ranked = sorted(((difference(m, got), m) for m in modes), key=lambda c: c[0].score)
    named = [m for d, m in ranked if d.rates_agree and d.syncs_agree]
    if named:
        return Naming(mode=named[0], also=tuple(named[1:]))
    same_size = [(d, m) for d, m in ranked
                 if got.size is None or (m.horizontal.active, m.vertical.active) == got.size]  # fmt: skip
    if not same_size:
        return Naming()
    d, m = same_size[0]
    return Naming(nearest=m, nearest_why=d.why, nearest_rates_agree=d.rates_agree)


def base_source(m: Mode) -> str:
    """``"CTA VIC 1 (1000/1001)"`` -> ``"CTA VIC 1"``: the entry without its derived variant."""
    return m.source.removesuffix(" (1000/1001)")


def also_text(mode: Mode, also: tuple[Mode, ...]) -> str:
    """"; also matches CTA VIC 1 at 59.94 and 60 Hz": each other entry once, with its refreshes.

    An entry and its 1000/1001 variant are one format at two refreshes, so they
    are named once; the mode's own entry is not repeated.
    """
    labels: dict[str, list[str]] = {}
    for m in also:
        if base_source(m) != base_source(mode) and m.refresh_label not in labels.get(base_source(m), []):
            labels.setdefault(base_source(m), []).append(m.refresh_label)
    out = ""
    for source, refreshes in labels.items():
        refreshes.sort(key=float)
        out += f"; also matches {source} at {' and '.join(refreshes)} Hz"
    return out


def spec_mode(spec: Spec, modes: tuple[Mode, ...] | None = None) -> Mode | None:
    """The mode a monitor would take ``spec``'s own figures for, when it is one of the spec's size."""
    h, v = spec.horizontal, spec.vertical
    line_rate = float(spec.pixel_clock_hz) / h.total
    got = Measured(float(1 / spec.pixel_clock_hz), line_rate, line_rate / v.total, v.total,
                   h.sync_polarity, v.sync_polarity, h.sync, v.sync, (h.active, v.active))  # fmt: skip
    mode = name_mode(got, modes if modes is not None else library()).mode
    return mode if mode is not None and (mode.horizontal.active, mode.vertical.active) == got.size else None
