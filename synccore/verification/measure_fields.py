"""Measuring an interlaced core field by field (see :mod:`synccore.model.fields`).

The vertical figures of an interlaced timing differ between its two fields, so
they are measured per field and shown as ``"field 0 / field 1"``.  Fields are
told apart by the gap in de between them; field 0 is the one that begins with
frame_start.  Porches are counted in lines from the line's vsync column (the
hsync leading edge, or the line start), so field 0's half-line vsync shows as
half lines: 1080i measures a front porch of ``2.5 / 2`` and a back porch of
``15.5 / 15`` lines, and a vsync every ``562.5 / 562.5`` lines.
"""

from __future__ import annotations

from collections.abc import Sequence
from fractions import Fraction

from synccore.model import Event, Timing

FIELD_KEYS = ("frame_total", "field_lines", "v_active", "v_front", "vsync_width", "v_back",
              "vblank_width", "vsync_offset", "vsync_spacing", "x_range", "y_range",
              "line_start", "line_start_aligned", "frame_start", "frame_start_aligned",
              "field")  # fmt: skip
"""The quantities measured per field (the others are measured as for progressive timings)."""

FIELD_ROWS: tuple[tuple[str, str, str], ...] = (
    ("field_lines", "lines per field (field 0 / 1)", "lines"),
    ("vsync_spacing", "vsync to the next vsync (field 0 / 1)", "lines"),
    ("field", "field output (field 0 / 1)", ""),
)
"""Quantities only interlaced timings have: (key, label, unit)."""


def lines(value: Fraction) -> str:
    """A count of lines, whole or with a fraction (a half line shows as .5)."""
    if value.denominator == 1:
        return str(value.numerator)
    if value.denominator == 2:
        return f"{value.numerator / 2:.1f}"
    return f"{value.numerator}/{value.denominator}"


def _pair(a: object, b: object) -> str:
    return f"{a} / {b}"


def _field_starts(de_runs: Sequence[tuple[int, int]], line_total: int) -> list[int]:
    rises = [s for s, _ in de_runs]
    return [r for i, r in enumerate(rises) if i == 0 or r - rises[i - 1] > line_total]


def _vsync_in(vsyncs: list[tuple[int, int]], start: int, stop: int) -> int | None:
    """The leading edge of the one vsync pulse that starts in a field; None when not one."""
    mine = [s for s, _ in vsyncs if start <= s < stop]
    return mine[0] if len(mine) == 1 else None


def _one_field(t: Timing, events: dict[int, Event], runs: list[tuple[int, int]],
               vsyncs: list[tuple[int, int]], start: int, stop: int,
               h: int) -> dict[str, object]:  # fmt: skip
    """The figures of one field, from its first de rise (``start``) to the next field's."""
    out: dict[str, object] = {
        "field_lines": lines(Fraction(stop - start, h)),
        "v_active": len(runs),
        "vblank_width": lines(Fraction(stop - (runs[-1][0] + h), h)) if runs else "none",
        "line_start": (events[stop].line_starts - events[start].line_starts) % 65536,
        "frame_start": (events[stop].frame_starts - events[start].frame_starts) % 65536,
        "line_start_aligned": "yes" if all(events[s].line_start for s, _ in runs) else "no",
    }
    fields = {events[s].field for s, _ in runs}
    out["field"] = fields.pop() if len(fields) == 1 else "mixed"
    rows = [events[s].y for s, _ in runs]
    steady = rows == [rows[0] + 2 * i for i in range(len(rows))]
    out["y_range"] = f"{rows[0]}..{rows[-1]} by 2" if steady and rows else f"irregular {rows[:4]}"
    firsts = {events[s].x for s, _ in runs}
    lasts = {events[e].x_last for _, e in runs}
    out["x_range"] = (f"{min(firsts)}..{max(lasts)}" if len(firsts) == 1 and len(lasts) == 1
                      else f"{sorted(firsts)}..{sorted(lasts)}")  # fmt: skip
    mine = [(s, e) for s, e in vsyncs if start <= s < stop]
    if len(mine) == 1 and runs:
        s, e = mine[0]
        c = t.v_sync_at_h  # porches are counted from the line's vsync column
        out["vsync_offset"] = ((s - start) % h) * t.ppc
        out["v_front"] = lines(Fraction(s - c - (runs[-1][0] + h), h))
        out["vsync_width"] = lines(Fraction(e - s, h))
        out["v_back"] = lines(Fraction(stop - (e - c), h))
    else:
        for key in ("vsync_offset", "v_front", "vsync_width", "v_back"):
            out[key] = f"{len(mine)} vsync pulses"
    return out


def measure_fields(events: Sequence[Event], de_runs: Sequence[tuple[int, int]],
                   vsyncs: list[tuple[int, int]], line_total: int,
                   t: Timing) -> dict[str, set[object]]:  # fmt: skip
    """Per-field figures of every whole frame seen (field 0 then field 1), as "f0 / f1" text."""
    found: dict[str, set[object]] = {key: set() for key in FIELD_KEYS}
    if not line_total:
        return found
    by_adv = {e.adv: e for e in events}
    starts = _field_starts(de_runs, line_total)
    measured = []
    for start, stop in zip(starts, starts[1:], strict=False):
        runs = [(s, e) for s, e in de_runs if start <= s < stop]
        measured.append((start, stop, _one_field(t, by_adv, runs, vsyncs, start, stop, line_total)))
    edges = [_vsync_in(vsyncs, start, stop) for start, stop, _ in measured]
    for i in range(len(measured) - 1):
        (s0, _, f0), (_, _, f1) = measured[i], measured[i + 1]
        if not by_adv[s0].frame_start:
            continue  # a frame begins with field 0, whose first pixel has frame_start
        for key in FIELD_KEYS:
            if key in f0:
                found[key].add(_pair(f0[key], f1[key]))
        found["frame_start_aligned"].add("yes")
        if i + 2 < len(measured):
            found["frame_total"].add(lines(Fraction(measured[i + 2][0] - s0, line_total)))
        ends = edges[i:i + 3]
        if len(ends) == 3 and None not in ends:  # field 0's vsync, field 1's, the next field 0's
            a, b, c = (int(e) for e in ends if e is not None)
            found["vsync_spacing"].add(_pair(lines(Fraction(b - a, line_total)),
                                             lines(Fraction(c - b, line_total))))
    return found


def expected_fields(t: Timing) -> dict[str, object]:
    """What the model says each per-field quantity must be, as "field 0 / field 1"."""
    h, v = t.h_total, t.spec.vertical
    c = t.v_sync_at_h
    starts = [line * h + column for line, column in (t.vsync_at(0), t.vsync_at(1))]
    front = [lines(Fraction(s - c - t.v_active * h, h)) for s in starts]
    back = [lines(Fraction(t.field_lines(f) * h - (starts[f] + v.sync * h - c), h)) for f in (0, 1)]
    spacing0 = Fraction(t.field_lines(0) * h + starts[1] - starts[0], h)
    rows = 2 * t.v_active
    return {
        "frame_total": str(t.frame_lines),
        "field_lines": _pair(t.field_lines(0), t.field_lines(1)),
        "v_active": _pair(v.active, v.active),
        "v_front": _pair(*front),
        "vsync_width": _pair(v.sync, v.sync),
        "v_back": _pair(*back),
        "vblank_width": _pair(t.field_lines(0) - v.active, t.field_lines(1) - v.active),
        "vsync_offset": _pair(*(column * t.ppc for _, column in (t.vsync_at(0), t.vsync_at(1)))),
        "vsync_spacing": _pair(lines(spacing0), lines(t.frame_lines - spacing0)),
        "x_range": _pair(*[f"0..{t.spec.horizontal.active - t.ppc}"] * 2),
        "y_range": _pair(f"0..{rows - 2} by 2", f"1..{rows - 1} by 2"),
        "line_start": _pair(v.active, v.active),
        "line_start_aligned": _pair("yes", "yes"),
        "frame_start": _pair(1, 0),
        "frame_start_aligned": "yes",
        "field": _pair(0, 1),
    }
