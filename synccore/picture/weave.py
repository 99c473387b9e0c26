"""Weaving an interlaced core's two fields into one frame picture.

An interlaced core sends a frame as two fields (:mod:`synccore.model.fields`): field 0
carries the frame's even rows, field 1 its odd rows.  A TV shows the fields one after
the other; a deinterlacer weaves them into the frame: row ``2k`` is field 0's ``k``-th
active line, row ``2k + 1`` field 1's.

Interlaced specs have no first-light design yet (:func:`synccore.write` refuses the
pattern), so the picture is drawn from the core's own outputs: every active line of a
run (a run of de, as the measurement harness saw it, or as the timing model gives it)
becomes one row of the field it lies in, woven by field and order, and each of its
pixels takes the colour of a coordinate pattern (:func:`coordinate_colours`) at the x
and y the core put out there.  The woven picture equals that pattern drawn at the
picture's own columns and rows only when the core's y is ``2 x line + field``, its
field output names the field a line lies in and x steps across the line;
:func:`check_woven` says where it does not.  480i and 576i send each of their 720
pixels twice (pixel repetition 2): the picture has the 1440 clocks of a line, as x
counts them.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

import numpy as np
from PIL import Image

from synccore.model import Event, Timing
from synccore.picture.monitor import Monitor
from synccore.picture.run import ViewError
from synccore.spec import Spec
from synccore.timings.modes import library
from synccore.verification.engines import run_engine
from synccore.verification.measure import Figure, compare, failures


@dataclass(frozen=True)
class Line:
    """One active line (a run of de) as the core put it out."""

    start: int  # advancing edges at its first pixel
    field: int  # the core's field output on its first pixel
    y: int  # the core's y on its first pixel
    x_first: int
    x_last: int  # x on its last cycle
    steady: bool  # x stepped by pixels_per_clock across it and y held
    frame_start: bool  # frame_start on its first pixel


@dataclass
class Woven:
    """A frame woven from two fields, and what went wrong weaving it."""

    image: Image.Image | None
    rows: tuple[int, int] = (0, 0)  # active lines found in field 0 and in field 1
    problems: list[str] = field(default_factory=list)


def coordinate_colours(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """8-bit RGB of the coordinate pattern at ``x``, ``y`` (below 4096): red the low 8 bits
    of x, green the low 8 bits of y, blue their high 4 bits each; one colour per position."""
    x, y = np.broadcast_arrays(np.asarray(x, dtype=np.int64), np.asarray(y, dtype=np.int64))
    return np.stack([x & 0xFF, y & 0xFF, ((x >> 8) & 0xF) << 4 | ((y >> 8) & 0xF)],
                    axis=-1).astype(np.uint8)  # fmt: skip


def _coordinates(rgb: np.ndarray) -> tuple[int, int]:
    """The (x, y) whose coordinate colour ``rgb`` is."""
    r, g, b = (int(c) for c in rgb)
    return r | (b >> 4) << 8, g | (b & 0xF) << 8


def lines_from_events(events: Sequence[Event]) -> list[Line]:
    """The active lines of a harness run: one per de rise followed by its fall."""
    out, rise = [], None
    for e in events:
        if e.de and rise is None:
            rise = e
        elif not e.de and rise is not None:
            out.append(Line(rise.adv, rise.field, rise.y, rise.x, e.x_last,
                            e.step_faults == rise.step_faults, bool(rise.frame_start)))  # fmt: skip
            rise = None
    return out


def lines_from_model(t: Timing) -> list[Line]:
    """The active lines of one frame as the timing model gives them (no simulation)."""
    out, field_start = [], 0
    for f in range(t.fields):
        for line in range(t.v_active):
            q = field_start + line * t.h_total
            first, last = t.outputs_at(q), t.outputs_at(q + t.h_active - 1)
            out.append(Line(q, first.field, first.y, first.x, last.x, True, bool(first.frame_start)))
        field_start += t.field_lines(f) * t.h_total
    return out


def _fields(lines: list[Line], line_cycles: int) -> list[list[Line]]:
    """Lines grouped into fields: a gap of more than a line between two lines ends a field."""
    groups: list[list[Line]] = []
    for ln in lines:
        if not groups or ln.start - groups[-1][-1].start > line_cycles:
            groups.append([])
        groups[-1].append(ln)
    return groups


def weave(lines: list[Line], t: Timing) -> Woven:
    """The first whole frame of ``lines``: field 0 (from its frame_start) then field 1, woven."""
    groups = _fields(lines, t.h_total)
    first = next((i for i, g in enumerate(groups[:-1]) if g[0].frame_start), None)
    if first is None:
        return Woven(None, problems=["no whole frame: field 0 (from frame_start) and then field 1 "
                                     "were not both seen"])  # fmt: skip
    pair = groups[first], groups[first + 1]
    woven = Woven(None, rows=(len(pair[0]), len(pair[1])))
    for f, group in enumerate(pair):
        wrong = [k for k, ln in enumerate(group) if ln.field != f]
        if wrong:
            woven.problems.append(f"field output: {len(wrong)} of field {f}'s {len(group)} active lines "
                                  f"show field {1 - f}, first its line {wrong[0]}")  # fmt: skip
        unsteady = [k for k, ln in enumerate(group) if not ln.steady]
        if unsteady:
            woven.problems.append(f"x/y did not step steadily on {len(unsteady)} of field {f}'s active "
                                  f"lines, first its line {unsteady[0]}")  # fmt: skip
    if len(pair[0]) != len(pair[1]):
        woven.problems.append(f"the fields differ in active lines: {len(pair[0])} and {len(pair[1])}")
    width = t.spec.horizontal.active
    picture = np.zeros((2 * max(woven.rows), width, 3), dtype=np.uint8)
    columns = np.arange(width)
    for f, group in enumerate(pair):
        for k, ln in enumerate(group):
            sent = columns[: max(0, min(width, ln.x_last + t.ppc - ln.x_first))]
            picture[2 * k + f, : len(sent)] = coordinate_colours(ln.x_first + sent, np.full_like(sent, ln.y))
    woven.image = Image.fromarray(picture, "RGB")
    return woven


def check_woven(woven: Woven, t: Timing) -> None:
    """A problem when the woven picture is not the coordinate pattern at its own columns and
    rows (the frame's ``2 x v_active`` rows of ``horizontal.active`` pixels)."""
    if woven.image is None:
        return
    got = np.asarray(woven.image)
    rows, width = t.frame_rows, t.spec.horizontal.active
    if got.shape[:2] != (rows, width):
        woven.problems.append(f"the woven picture is {got.shape[1]}x{got.shape[0]}, the frame is "
                              f"{width}x{rows}")  # fmt: skip
        return
    want = coordinate_colours(np.arange(width)[None, :], np.arange(rows)[:, None])
    bad = np.argwhere((got != want).any(axis=-1))
    if len(bad):
        r, c = (int(i) for i in bad[0])
        x, y = _coordinates(got[r, c])
        woven.problems.append(f"the woven picture differs from the coordinate pattern on {len(bad)} "
                              f"pixels, first at column {c}, row {r} (field {r % 2}'s line {r // 2}): "
                              f"the core put out x = {x}, y = {y} there")  # fmt: skip


def view_interlaced(spec: Spec, *, engine: str, work_dir: Path) -> Monitor:
    """Run ``spec``'s interlaced core on ``engine`` for two frames and look at it as a TV
    would: rates and figures measured, the first frame woven from its two fields.

    ``engine`` is a simulator, ``builtin``, or ``model`` (the timing model's outputs, no
    simulation).  Every figure the run measures is judged against the model (a mismatch
    is a problem); the picture is the coordinate pattern at the core's x and y, woven and
    checked by :func:`check_woven`.  :class:`ViewError` when the engine cannot run.
    """
    t = Timing(spec)
    mon = Monitor(period_s=float(1 / spec.pixel_clock_hz))
    figures = None
    if engine == "model":
        lines = lines_from_model(t)
    else:
        run = run_engine(spec, engine, frames=2, work_dir=work_dir)
        if run.error is not None or run.figures is None:
            raise ViewError(f"{engine}: {run.error}")
        figures = run.figures
        lines = lines_from_events(run.events)
        mon.problems += failures(compare(t, {engine: figures}))
    _rates(mon, t, figures)
    woven = weave(lines, t)
    check_woven(woven, t)
    mon.image, mon.size = woven.image, (spec.horizontal.active, sum(woven.rows))
    mon.problems += woven.problems
    mon.placed_by = ("weaving field 0 (even rows) and field 1 (odd rows) of the core's x/y: "
                     "a coordinate pattern, as interlaced specs have no first-light design yet")  # fmt: skip
    if not mon.problems:
        same = [m for m in library() if m.interlaced and (m.pixel_clock_hz, m.horizontal, m.vertical)
                == (spec.pixel_clock_hz, spec.horizontal, spec.vertical)]  # fmt: skip
        mon.mode, mon.also = (same[0], tuple(same[1:])) if same else (None, ())
    return mon


def _single(figures: dict[str, Figure], key: str) -> str | None:
    values = figures[key].values
    return str(values[0]) if len(values) == 1 else None


def _rates(mon: Monitor, t: Timing, figures: dict[str, Figure] | None) -> None:
    """Line and field rates, sync polarities and widths: measured, or the model's (``model``)."""
    if figures is None:
        line, frame = t.h_total * t.ppc, t.frame_lines
        hs, vs = t.spec.horizontal, t.spec.vertical
        mon.hsync_polarity, mon.hsync_cycles = hs.sync_polarity, hs.sync
        mon.vsync_polarity, mon.vsync_lines = vs.sync_polarity, vs.sync
        split = f"{t.field_lines(0)} / {t.field_lines(1)}"
    else:
        texts = {key: _single(figures, key) for key in ("line_total", "frame_total", "hsync_width",
                 "hsync_polarity", "vsync_polarity", "vsync_width", "field_lines")}  # fmt: skip
        if None in (texts["line_total"], texts["frame_total"]):
            return
        line, frame = int(str(texts["line_total"])), int(str(texts["frame_total"]))
        mon.hsync_polarity, mon.vsync_polarity = texts["hsync_polarity"], texts["vsync_polarity"]
        hs_width = texts["hsync_width"] or ""
        mon.hsync_cycles = int(hs_width) if hs_width.isdigit() else None
        width = (texts["vsync_width"] or "").split(" / ")[0]
        mon.vsync_lines = int(width) if width.isdigit() else None
        split = texts["field_lines"] or "varying"
    mon.line_cycles, mon.lines_per_frame = line, frame
    mon.line_rate_hz = 1 / (line * mon.period_s)
    field_rate = Fraction(t.spec.pixel_clock_hz) * 2 / (line * frame)
    mon.refresh_hz = float(field_rate)
    mon.frame_cycles = line * frame
    mon.notes.append(f"interlaced: {float(field_rate):.3f} fields per second, {float(field_rate) / 2:.3f} "
                     f"frames per second; lines per field {split} (field 0: even rows, field 1: odd "
                     f"rows); the vsync before field 1 comes half a line ({line // 2} clocks) after "
                     "the line's hsync leading edge")  # fmt: skip
