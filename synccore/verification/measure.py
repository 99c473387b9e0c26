"""Measuring a running core from its signal edges, and judging it against the spec.

A simulator (through the cocotb bench in ``sim/``) or the built-in engine records
an :class:`~synccore.model.Event` whenever hsync, vsync, de or a blank changes.  :func:`measure` turns
the events into figures (widths, porches, polarities, ranges, strobe counts),
:func:`expected` says what the reference model wants for each, and
:func:`compare` lays both side by side.  The events carry the count of
advancing clock edges, so an irregular clock enable changes nothing here.
"""

from __future__ import annotations

import bisect
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from synccore.model import Event, Timing
from synccore.verification.measure_fields import (
    FIELD_KEYS,
    FIELD_ROWS,
    expected_fields,
    measure_fields,
)


@dataclass(frozen=True)
class Figure:
    """One measured quantity: its name, unit, and every distinct value seen (sorted)."""

    key: str
    label: str
    unit: str
    values: tuple[object, ...]

    def text(self) -> str:
        if not self.values:
            return "not seen"
        if len(self.values) == 1:
            return str(self.values[0])
        if all(isinstance(v, int) for v in self.values):
            return f"{self.values[0]}..{self.values[-1]} (varies)"
        return " / ".join(str(v) for v in self.values) + " (varies)"


# key, label, unit — the table's rows, in order.
QUANTITIES: tuple[tuple[str, str, str], ...] = (
    ("first_de", "first de after reset", "cycle"),
    ("line_total", "line total", "px"),
    ("hsync_period", "hsync period", "px"),
    ("h_active", "de run length", "px"),
    ("h_front", "h front porch", "px"),
    ("hsync_width", "hsync width", "px"),
    ("h_back", "h back porch", "px"),
    ("hblank_width", "hblank width", "px"),
    ("hsync_polarity", "hsync polarity", ""),
    ("frame_total", "lines per frame", "lines"),
    ("v_active", "active lines", "lines"),
    ("v_front", "v front porch", "lines"),
    ("vsync_width", "vsync width", "lines"),
    ("v_back", "v back porch", "lines"),
    ("vblank_width", "vblank width", "lines"),
    ("vsync_polarity", "vsync polarity", ""),
    ("vsync_offset", "vsync edge in line", "px"),
    ("x_range", "x range", ""),
    ("y_range", "y range", ""),
    ("xy_steps", "x/y step faults", ""),
    ("de_vs_blanks", "de = not (hblank or vblank)", ""),
    ("line_start", "line_start per frame", ""),
    ("line_start_aligned", "line_start with de rise", ""),
    ("frame_start", "frame_start per frame", ""),
    ("frame_start_aligned", "frame_start with frame's first de", ""),
)
LABELS = {key: (label, unit) for key, label, unit in QUANTITIES + FIELD_ROWS}


def quantities(t: Timing) -> tuple[tuple[str, str, str], ...]:
    """The rows measured for ``t``: interlaced timings add field rows and measure per field."""
    if not t.interlaced:
        return QUANTITIES
    rows: list[tuple[str, str, str]] = []
    for key, label, unit in QUANTITIES:
        per_field = key in FIELD_KEYS and key not in ("frame_total", "frame_start_aligned")
        rows.append((key, f"{label} (field 0 / 1)" if per_field else label, unit))
        if key == "frame_total":
            rows += FIELD_ROWS
    return tuple(rows)


def _idle_level(events: Sequence[Event], name: str) -> set[int]:
    """The level(s) a sync holds for most of the cycles during which de is high."""
    cycles = [0, 0]
    for e, nxt in zip(events, events[1:], strict=False):
        if e.de:
            cycles[getattr(e, name)] += nxt.adv - e.adv
    if cycles[0] == cycles[1]:
        return {0, 1} if cycles[0] else set()
    return {0 if cycles[0] > cycles[1] else 1}


def _polarity(idle: set[int]) -> tuple[object, ...]:
    return tuple(sorted("negative" if level else "positive" for level in idle))


def _pulses(events: Sequence[Event], name: str, active: int) -> list[tuple[int, int | None]]:
    """(start, end) advancing-edge counts of each pulse at level ``active``; end None if open."""
    pulses: list[tuple[int, int | None]] = []
    prev = None
    for e in events:
        level = getattr(e, name)
        if level != prev:
            if level == active:
                pulses.append((e.adv, None))
            elif pulses and pulses[-1][1] is None and prev is not None:
                pulses[-1] = (pulses[-1][0], e.adv)
            prev = level
    return pulses


Found = dict[str, set[object]]
"""The distinct values seen so far of each quantity, by key."""


@dataclass(frozen=True)
class _Pulses:
    """The pulses of a run that the figures are measured from, in advancing-edge counts."""

    de_runs: list[tuple[int, int]]
    hsyncs: list[tuple[int, int]]  # at the measured active level
    vsyncs: list[tuple[int, int]]
    hblanks: list[tuple[int, int | None]]  # the last one may still be open
    line_starts: list[int]  # every line start, active or not: where hblank falls
    line_total: int  # the most frequent line period in cycles; 0 when fewer than two lines seen

    @property
    def rises(self) -> list[int]:
        return [s for s, _ in self.de_runs]


def _closed(pulses: list[tuple[int, int | None]]) -> list[tuple[int, int]]:
    return [(s, e) for s, e in pulses if e is not None]


def _active_level(idle: set[int], fallback: int) -> int:
    """The level a sync pulses to: the other one than its idle level, when that is clear."""
    return 1 - min(idle) if len(idle) == 1 else fallback


def _find_pulses(events: Sequence[Event], h_active_level: int, v_active_level: int) -> _Pulses:
    # Lines are told apart by hblank, which falls at every line start, active or not.
    hblanks = _pulses(events, "hblank", 1)
    line_starts = [e for _, e in hblanks if e is not None]
    periods = [b - a for a, b in zip(line_starts, line_starts[1:], strict=False)]
    return _Pulses(
        de_runs=_closed(_pulses(events, "de", 1)),
        hsyncs=_closed(_pulses(events, "hsync", h_active_level)),
        vsyncs=_closed(_pulses(events, "vsync", v_active_level)),
        hblanks=hblanks,
        line_starts=line_starts,
        line_total=max(set(periods), key=periods.count) if periods else 0,
    )


def measure(events: Sequence[Event], t: Timing) -> dict[str, Figure]:
    """Figures measured from the events of a run of at least two frames."""
    found: Found = {key: set() for key, _, _ in quantities(t)}
    # Polarity: a sync's idle level is the level it holds for most of the time de is high
    # (vsync may overlap the first active line when the vertical back porch is 0).
    h_idle = _idle_level(events, "hsync")
    v_idle = _idle_level(events, "vsync")
    p = _find_pulses(events, _active_level(h_idle, t.hsync_active_level),
                     _active_level(v_idle, t.vsync_active_level))  # fmt: skip
    if p.de_runs:
        found["first_de"].add(p.de_runs[0][0])
    _measure_lines(found, events, p, t.ppc)
    if t.interlaced:
        found.update(measure_fields(events, p.de_runs, p.vsyncs, p.line_total, t))
    else:
        if p.line_total:
            _measure_vertical(found, events, p, t.ppc)
        _measure_frames(found, events, p, t)
    if events:
        found["xy_steps"].add(events[-1].step_faults)
    found["hsync_polarity"] = set(_polarity(h_idle))
    found["vsync_polarity"] = set(_polarity(v_idle))
    return {
        key: Figure(key, label, unit, tuple(sorted(found[key], key=_sort_key)))
        for key, label, unit in quantities(t)
    }


def _measure_lines(found: Found, events: Sequence[Event], p: _Pulses, ppc: int) -> None:
    """Horizontal figures, in pixels: periods, widths, de runs and the porches of every line."""
    for (s1, _), (s2, _) in zip(p.hsyncs, p.hsyncs[1:], strict=False):
        found["hsync_period"].add((s2 - s1) * ppc)
    for s, e in p.hsyncs:
        found["hsync_width"].add((e - s) * ppc)
    found["line_total"].update((b - a) * ppc for a, b in zip(p.line_starts, p.line_starts[1:], strict=False))
    for b_start, b_end in p.hblanks:
        if b_end is not None and b_start > 0:
            found["hblank_width"].add((b_end - b_start) * ppc)
    found["de_vs_blanks"].add(
        "yes" if all(e.de == 1 - (e.hblank | e.vblank) for e in events[1:]) else "no")  # fmt: skip
    for s, e in p.de_runs:
        found["h_active"].add((e - s) * ppc)
    # Porches around every hsync pulse, active line or not: from the blanking start (hblank
    # rising) to the pulse, and from the pulse to the next line start (hblank falling).
    # Both lists are in advancing-edge order: the last blanking start at or before the pulse
    # and the first line start at or after its end are found by bisection (a scan per pulse
    # took most of a second on two 1080-line frames).
    blank_starts = [s for s, _ in p.hblanks if s > 0]
    for s, e in p.hsyncs:
        i = bisect.bisect_right(blank_starts, s)
        if i and s - blank_starts[i - 1] < max(p.line_total, 1):
            found["h_front"].add((s - blank_starts[i - 1]) * ppc)
        j = bisect.bisect_left(p.line_starts, e)
        if j < len(p.line_starts) and p.line_starts[j] - e < max(p.line_total, 1):
            found["h_back"].add((p.line_starts[j] - e) * ppc)


def _measure_vertical(found: Found, events: Sequence[Event], p: _Pulses, ppc: int) -> None:
    """Vertical figures, in lines (needs a line total): blanking, vsync and its porches."""
    line_total = p.line_total
    for b_start, b_end in _pulses(events, "vblank", 1):
        if b_end is not None and b_start > 0:
            found["vblank_width"].add(_lines(b_end - b_start, line_total))
    # Frames: the de runs between consecutive vsync pulses.
    rises = p.rises
    for (s, e), nxt in zip(p.vsyncs, [*p.vsyncs[1:], None], strict=False):
        before = [r for r in rises if r <= s]
        if before:
            offset = (s - before[-1]) % line_total
            found["vsync_offset"].add(offset * ppc)
            found["v_front"].add((s - offset - before[-1] - line_total) // line_total)
            found["vsync_width"].add(_lines(e - s, line_total))
            # The line in which vsync ends starts `offset` cycles before its end.
            after = [r for r in rises if r >= e - offset]
            if after:
                found["v_back"].add((after[0] - (e - offset)) // line_total)
        if nxt is not None:
            found["frame_total"].add(_lines(nxt[0] - s, line_total))


def _measure_frames(found: Found, events: Sequence[Event], p: _Pulses, t: Timing) -> None:
    """Per frame, from one frame's first de rise to the next: active lines, coordinates, strobes."""
    by_adv = {e.adv: e for e in events}
    rises = p.rises
    frame_firsts = [r for i, r in enumerate(rises) if i == 0 or r - rises[i - 1] > p.line_total]
    for start, stop in zip(frame_firsts, frame_firsts[1:], strict=False):
        runs = [(s, e) for s, e in p.de_runs if start <= s < stop]
        found["v_active"].add(len(runs))
        # Right after reset a pixel pipeline of latency `lead` (the harness's delay line)
        # still passes on the coordinates the core held in reset: the coordinates of a
        # frame are judged only when it begins at or after the model's first exact
        # position (an event's adv counts edges, so it shows position adv - 1).
        if start - 1 >= t.exact_xy_from:
            _measure_coordinates(found, runs, by_adv, t.scale_shift)
        found["line_start"].add((by_adv[stop].line_starts - by_adv[start].line_starts) % 65536)
        found["frame_start"].add((by_adv[stop].frame_starts - by_adv[start].frame_starts) % 65536)
        found["line_start_aligned"].add(
            "yes" if all(by_adv[s].line_start for s, _ in runs) else "no")  # fmt: skip
        found["frame_start_aligned"].add(
            "yes" if by_adv[start].frame_start and not any(by_adv[s].frame_start for s, _ in runs[1:])
            else "no")  # fmt: skip


def _measure_coordinates(found: Found, runs: list[tuple[int, int]], by_adv: dict[int, Event],
                         scale_shift: int) -> None:  # fmt: skip
    """x and y ranges of one frame's de runs: x from each run's first and last pixel, y per run."""
    rows = [by_adv[s].y for s, _ in runs]
    firsts = {by_adv[s].x for s, _ in runs}
    lasts = {by_adv[e].x_last for _, e in runs}
    found["x_range"].add(f"{min(firsts)}..{max(lasts)}"
                         if len(firsts) == 1 and len(lasts) == 1
                         else f"{sorted(firsts)}..{sorted(lasts)}")  # fmt: skip
    s = scale_shift  # with core.scale each row number repeats 2**s times
    steady = rows == [((rows[0] << s) + i) >> s for i in range(len(rows))]
    found["y_range"].add(f"{rows[0]}..{rows[-1]}" if steady else f"irregular {rows[:6]}")


def _lines(cycles: int, line_total: int) -> object:
    return cycles // line_total if cycles % line_total == 0 else f"{cycles}/{line_total} cycles"


def _sort_key(value: object) -> tuple[int, str]:
    return (0, f"{value:012d}") if isinstance(value, int) else (1, str(value))


def expected(t: Timing) -> dict[str, object]:
    """What the reference model says each measured quantity must be."""
    h, v = t.spec.horizontal, t.spec.vertical
    want: dict[str, object] = {
        "first_de": 1,
        "line_total": h.total,
        "hsync_period": h.total,
        "h_active": h.active,
        "h_front": h.front_porch,
        "hsync_width": h.sync,
        "h_back": h.back_porch,
        "hblank_width": h.blanking,
        "hsync_polarity": h.sync_polarity,
        "frame_total": v.total,
        "v_active": v.active,
        "v_front": v.front_porch,
        "vsync_width": v.sync,
        "v_back": v.back_porch,
        "vblank_width": v.blanking,
        "vsync_polarity": v.sync_polarity,
        "vsync_offset": t.v_sync_at_h * t.ppc,
        "x_range": f"0..{(h.active - t.ppc) >> t.scale_shift}",
        "y_range": f"0..{(v.active - 1) >> t.scale_shift}",
        "xy_steps": 0,
        "de_vs_blanks": "yes",
        "line_start": v.active,
        "line_start_aligned": "yes",
        "frame_start": 1,
        "frame_start_aligned": "yes",
    }
    if t.interlaced:
        want.update(expected_fields(t))
    return want


@dataclass(frozen=True)
class Row:
    key: str
    label: str
    unit: str
    want: object
    got: dict[str, str]  # engine name -> measured text
    ok: bool


def compare(t: Timing, runs: dict[str, dict[str, Figure]]) -> list[Row]:
    """One row per quantity: the expected value, each engine's measurement, and the verdict."""
    want = expected(t)
    rows = []
    for key, label, unit in quantities(t):
        got = {engine: figs[key].text() for engine, figs in runs.items()}
        ok = all(figs[key].values == (want[key],) for figs in runs.values())
        rows.append(Row(key, label, unit, want[key], got, ok))
    return rows


def failures(rows: Iterable[Row]) -> list[str]:
    """One line per failed quantity, naming it and what each engine measured."""
    out = []
    for r in rows:
        if not r.ok:
            seen = ", ".join(f"{engine}: {text}" for engine, text in r.got.items())
            out.append(f"{r.label}: want {r.want}{' ' + r.unit if r.unit else ''}, measured {seen}")
    return out
