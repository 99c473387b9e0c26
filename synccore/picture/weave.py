"""Weaving an interlaced design's two fields into one frame picture, as a TV does.

An interlaced timing sends a frame as two fields (:mod:`synccore.model.fields`): field 0
carries the frame's even rows, field 1 its odd rows.  A TV tells them apart by where each
field's vsync starts within its line: the vsync that leads into field 1 starts half a
line off the hsync leading edge, the one that leads into field 0 with it.  So here, from
the pins alone: the active lines are grouped into fields by the gaps in de; a field whose
blanking holds the half-line vsync is field 0, one whose blanking holds the vsync on the
hsync edge is field 1; the first field 0 and the field 1 after it are woven, field 0's
``k``-th active line into row ``2k`` and field 1's into row ``2k + 1``, each sampled at
the pixel clock where de is high.

:func:`view_interlaced` runs the first-light design of an interlaced spec, measures the
line and field rates and the syncs, weaves the frame and compares it with the pattern
(:func:`synccore.picture.compare.check_pattern`).  480i and 576i send each of their 720
pixels twice (pixel repetition 2): the picture has the 1440 clocks of a line.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

import numpy as np
from PIL import Image

from synccore.picture.compare import check_pattern
from synccore.picture.monitor import Monitor, count, to_8bit
from synccore.picture.run import Pins, simulate
from synccore.spec import Spec
from synccore.timings.modes import Mode, library

Run = tuple[int, int]
"""A run of de: (first sample, sample after the last)."""


@dataclass
class Woven:
    """A frame woven from two fields, and what the weaving found."""

    image: Image.Image | None = None
    field_lines: tuple[int, int] | None = None  # lines from field 0's first pixel to field 1's, and on
    half_line: int | None = None  # the half-line vsync's samples after its line's hsync leading edge
    problems: list[str] = field(default_factory=list)


def _level(signal: np.ndarray) -> int:
    """The level a sync pulses to: the one it holds for the shorter time."""
    return 1 if int(signal.sum()) * 2 < len(signal) else 0


def _leading(signal: np.ndarray) -> np.ndarray:
    """Sample index of each leading edge of ``signal``'s pulses."""
    on = (signal == _level(signal)).astype(np.int8)
    return np.flatnonzero(np.diff(on) == 1) + 1


def _runs(de: np.ndarray) -> list[Run]:
    change = np.diff(np.concatenate([[0], de.astype(np.int8), [0]]))
    return list(zip(np.flatnonzero(change == 1).tolist(), np.flatnonzero(change == -1).tolist(),
                    strict=True))  # fmt: skip


def _fields(runs: list[Run], line: int) -> list[list[Run]]:
    """Runs of de grouped into fields: a gap of more than a line ends a field."""
    groups: list[list[Run]] = []
    for run in runs:
        if not groups or run[0] - groups[-1][-1][0] > line:
            groups.append([])
        groups[-1].append(run)
    return groups


def _vsync_column(marks: np.ndarray, vs: np.ndarray, start: int, stop: int) -> int | None:
    """Samples from the last of ``marks`` (where lines are counted from) to the one vsync
    leading edge in ``[start, stop)``; None when there is not exactly one, or no mark before it."""
    mine = vs[(vs >= start) & (vs < stop)]
    before = marks[marks <= mine[0]] if len(mine) == 1 else marks[:0]
    return int(mine[0] - before[-1]) if len(before) else None


def weave_pins(pins: Pins, *, vsync_align: str = "hsync") -> Woven:
    """The first whole frame of ``pins`` (field 0, then field 1) woven into one picture.

    ``vsync_align`` (the spec's ``core.vsync_align``) is where the vsync on the edge starts:
    with the hsync leading edge (``hsync``, as CTA-861 has it and a TV expects), or at the
    start of a line (``line``: counted from the column where de rises).
    """
    hs, vs = _leading(pins.hsync), _leading(pins.vsync)
    if pins.de is None or len(hs) < 2:
        return Woven(problems=["no de or no hsync: the fields cannot be found"])
    line = int(np.bincount(np.diff(hs)).argmax())
    runs = _runs(pins.de)
    groups = _fields(runs, line)
    marks = hs if vsync_align == "hsync" or not runs else runs[0][0] % line + line * np.arange(
        pins.cycles // line + 1)  # fmt: skip
    kinds = []  # the field each group is, by the vsync in the blanking after it
    for i, group in enumerate(groups):
        stop = groups[i + 1][0][0] if i + 1 < len(groups) else pins.cycles
        column = _vsync_column(marks, vs, group[-1][1], stop)
        near = None if column is None else min(column, line - column) <= line // 8
        half = None if column is None else abs(column - line // 2) <= line // 8
        kinds.append((0 if half else 1 if near else None, column))
    pair = next((i for i in range(len(groups) - 1) if kinds[i][0] == 0 and kinds[i + 1][0] == 1), None)
    if pair is None:
        return Woven(problems=["no whole frame: no field whose blanking holds a vsync half a line off "
                               "the hsync leading edge followed by one whose vsync is on it"])  # fmt: skip
    f0, f1 = groups[pair], groups[pair + 1]
    woven = Woven(half_line=kinds[pair][1])
    if pair + 2 < len(groups):
        woven.field_lines = (round(Fraction(f1[0][0] - f0[0][0], line)),
                             round(Fraction(groups[pair + 2][0][0] - f1[0][0], line)))  # fmt: skip
    if len(f0) != len(f1):
        woven.problems.append(f"the fields differ in active lines: {len(f0)} and {len(f1)}")
    width = int(np.bincount([b - a for a, b in f0 + f1]).argmax())
    rows = np.zeros((2 * max(len(f0), len(f1)), width, 3), dtype=np.uint8)
    levels = tuple(zip((pins.red, pins.green, pins.blue), pins.bits, strict=True))
    for f, group in enumerate((f0, f1)):
        for k, (a, b) in enumerate(group):
            idx = np.arange(a, a + min(width, b - a))
            rows[2 * k + f, : len(idx)] = np.stack([to_8bit(lv[idx], bits) for lv, bits in levels], axis=-1)
    woven.image = Image.fromarray(rows, "RGB")
    return woven


def _syncs(mon: Monitor, pins: Pins) -> Fraction | None:
    """Line and field rates, sync polarities and widths; the field period in lines."""
    hs, vs = _leading(pins.hsync), _leading(pins.vsync)
    if len(hs) < 2 or len(vs) < 3:
        mon.problems.append("fewer than two hsync or three vsync pulses: no rates")
        return None
    mon.line_cycles = int(np.bincount(np.diff(hs)).argmax())
    mon.line_rate_hz = 1 / (mon.line_cycles * pins.period_s)
    spacing = np.diff(vs)
    if spacing.min() != spacing.max():
        mon.problems.append(f"jitter: vsync to vsync varies from {spacing.min()} to {spacing.max()} clocks")
    mon.frame_cycles = int(2 * spacing[0])  # two fields
    mon.refresh_hz = 1 / (int(spacing[0]) * pins.period_s)  # fields per second
    per_field = Fraction(int(spacing[0]), mon.line_cycles)
    mon.lines_per_frame = round(2 * per_field)
    for name, signal in (("hsync", pins.hsync), ("vsync", pins.vsync)):
        level = _level(signal)
        on = np.flatnonzero(np.diff((signal == level).astype(np.int8)) == -1) + 1
        start = _leading(signal)
        widths = [int(e - s) for s in start for e in on[on > s][:1]]
        setattr(mon, f"{name}_polarity", "positive" if level else "negative")
        if name == "hsync" and widths:
            mon.hsync_cycles = widths[0]
        elif widths:
            mon.vsync_lines = round(widths[0] / mon.line_cycles)
    return per_field


def _mode(mon: Monitor, pins: Pins) -> Mode | None:
    """The interlaced library mode of these rates, lines and polarities at the pins' clock."""
    clock = 1 / pins.period_s
    for m in library():
        if (m.interlaced and m.horizontal.total == mon.line_cycles
                and 2 * m.vertical.total + 1 == mon.lines_per_frame
                and (m.horizontal.sync_polarity, m.vertical.sync_polarity)
                == (mon.hsync_polarity, mon.vsync_polarity)
                and abs(float(m.pixel_clock_hz) - clock) <= clock * 1e-6):  # fmt: skip
            return m
    return None


def view_interlaced(spec: Spec, pattern: str, *, engine: str, work_dir: Path) -> Monitor:
    """Run ``spec``'s first-light design with ``pattern`` on ``engine`` and look at it as a TV
    would: line and field rates and syncs measured, the mode named, the first frame woven
    from its two fields and compared with the pattern.

    ``engine`` is one of :data:`synccore.picture.run.VIEW_ENGINES`; :class:`ViewError`
    when it cannot run.
    """
    pins = simulate(spec, pattern, engine=engine, work_dir=work_dir)
    mon = Monitor(period_s=pins.period_s)
    per_field = _syncs(mon, pins)
    woven = weave_pins(pins, vsync_align=spec.core.vsync_align)
    mon.problems += woven.problems
    mon.mode = _mode(mon, pins) if per_field is not None else None
    if per_field is not None and per_field.denominator != 2:
        mon.problems.append(f"a field is not a whole number of lines and a half: {float(per_field):.3f}")
    if woven.image is not None:
        mon.image, mon.size = woven.image, (woven.image.width, woven.image.height)
        mon.placed_by = "de, field 0 (even rows) and field 1 (odd rows) woven"
    if per_field is not None and woven.half_line is not None:
        split = "{} / {}".format(*woven.field_lines) if woven.field_lines else "not seen whole"
        mon.notes.append(f"interlaced: {mon.refresh_hz:.3f} fields per second, "
                         f"{(mon.refresh_hz or 0) / 2:.3f} frames per second, a vsync every "
                         f"{float(per_field):.1f} lines; lines per field {split} (field 0: even rows, "
                         f"field 1: odd rows); the vsync before field 1 starts "
                         f"{count(woven.half_line, 'clock')} after its line's "
                         f"{'hsync leading edge' if spec.core.vsync_align == 'hsync' else 'start'}, "
                         "half a line")  # fmt: skip
    check_pattern(mon, spec, pattern)
    return mon
