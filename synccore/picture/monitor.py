"""A simulated monitor: from sampled display pins to measured rates, a mode name and a picture.

It does what a monitor does with the pins of :class:`synccore.picture.run.Pins`:

1. finds each sync's polarity (the level held for the shorter time is the pulse);
2. measures the line period from hsync leading edges and the frame period from
   vsync leading edges, and the pulse widths; any spread between lines or
   frames is jitter;
3. names the standard mode whose rates, lines per frame, sync polarities and
   widths agree (:mod:`synccore.picture.naming`), or says none and names the
   nearest mode of the de region's size;
4. finds where de puts the picture: clocks from the hsync leading edge and
   lines from the vsync leading edge's line to the first pixel, de's width and
   its lines;
5. locks on the syncs and samples the picture at the design's own pixel clock
   (as a digital input does, and an analog monitor once its auto-adjust has set
   its sampling clock), where the mode's sync + back porch put it.  A picture
   elsewhere is what a real monitor handles: an analog (VGA) monitor recentres
   it within its adjustment range, a digital input (DVI, a panel) takes it
   where de is; that is a note with the offset, and the picture is sampled
   where de (or, without de, the spec) puts it;
6. judges what a display would reject or show wrong: rates outside the user's
   range; syncs with a mode's rates but not its polarity or width; a de region
   not of the mode's size, or of runs of unequal length; jitter (line or frame
   period, sync width, where de starts after vsync).  Given the spec the design
   is meant to send (``spec=``), de must also be where and as large as the
   spec's porches and active size say: the spec chose those porches, so a
   place off the spec is the design's fault, and one off the mode only is the
   spec's choice.  Without a spec (a user's own simulation) nothing says
   whether the porches are meant, and a place off the mode is a note.
   :func:`synccore.picture.compare.check_pattern` compares picture and pattern.

The vsync leading edge is expected together with an hsync leading edge, as in
DMT and CTA-861 timings; it is attributed to the first hsync leading edge at or
after it (allowing an eighth of a line early), which also reads cores whose
vsync changes at the start of a line.
Colour levels become 8-bit PNG values as ``round(level * 255 / (2**bits - 1))``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np
from PIL import Image

from synccore.model.tmds import eight_bit
from synccore.picture.naming import Measured, also_text, name_mode
from synccore.picture.run import Pins
from synccore.spec import Axis, Spec
from synccore.timings.modes import Mode, library

Range = tuple[tuple[float, float], tuple[float, float]]


@dataclass(frozen=True)
class Pulses:
    active_level: int
    leading: np.ndarray  # sample index of each leading edge
    widths: np.ndarray  # samples of each complete pulse


@dataclass(frozen=True)
class Place:
    """Where a picture is: its first pixel counted from the syncs, and its size."""

    column: int  # clocks from a line's hsync leading edge to its first picture pixel
    line: int  # lines from the vsync leading edge's line to the first picture line
    width: int
    lines: int

    @staticmethod
    def of(h: Axis, v: Axis) -> Place:
        """Where the axes ``h`` and ``v`` (a spec's or a mode's) put the picture: sync + back porch."""
        return Place(h.sync + h.back_porch, v.sync + v.back_porch, h.active, v.active)


def count(n: int, noun: str) -> str:
    """``count(1, "line")`` -> "1 line", ``count(7, "pixel")`` -> "7 pixels"."""
    return f"{n} {noun}" if abs(n) == 1 else f"{n} {noun}s"


@dataclass
class Monitor:
    """What the simulated monitor saw."""

    period_s: float
    line_cycles: int | None = None
    frame_cycles: int | None = None
    line_rate_hz: float | None = None
    refresh_hz: float | None = None
    hsync_polarity: str | None = None
    vsync_polarity: str | None = None
    hsync_cycles: int | None = None
    vsync_lines: int | None = None
    lines_per_frame: int | None = None
    mode: Mode | None = None
    also: tuple[Mode, ...] = ()
    nearest: Mode | None = None
    nearest_why: str = ""
    size: tuple[int, int] | None = None  # the de region's width and lines, when de is seen
    place: Place | None = None  # where de puts the picture
    offset: tuple[int, int] | None = None  # pixels and lines from where the named mode puts it
    image: Image.Image | None = None
    placed_by: str = ""
    problems: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    def summary(self) -> list[tuple[str, str]]:
        """Rows (label, value) for printing."""
        rows = []
        if self.line_rate_hz is not None:
            rows.append(("line rate", f"{self.line_rate_hz / 1e3:.3f} kHz ({self.line_cycles} clocks)"))
        if self.refresh_hz is not None:
            rows.append(("refresh", f"{self.refresh_hz:.3f} Hz ({count(self.lines_per_frame or 0, 'line')})"))
        if self.hsync_polarity:
            rows.append(("hsync", f"{self.hsync_polarity}, {count(self.hsync_cycles or 0, 'clock')}"))
        if self.vsync_polarity:
            rows.append(("vsync", f"{self.vsync_polarity}, {count(self.vsync_lines or 0, 'line')}"))
        if self.mode is not None:
            rows.append(("mode", f"{self.mode.name} ({self.mode.source}{also_text(self.mode, self.also)})"))
        elif self.nearest is not None:
            rows.append(("mode", f"no standard mode; nearest {self.nearest.name} ({self.nearest.source}): "
                                 f"{self.nearest_why}"))  # fmt: skip
        elif self.size is not None and self.line_rate_hz is not None:
            rows.append(("mode", f"no standard mode; no library mode of this size (de {self.size[0]}x"
                                 f"{self.size[1]}, {self.line_cycles} clocks per line, "
                                 f"{self.lines_per_frame} lines per frame)"))  # fmt: skip
        elif self.line_rate_hz is not None:
            rows.append(("mode", "no standard mode"))
        if self.image is not None:
            rows.append(("picture", f"{self.image.width}x{self.image.height}, placed by {self.placed_by}"))
        return rows


def _pulses(signal: np.ndarray) -> Pulses | None:
    level = 1 if int(signal.sum()) * 2 < len(signal) else 0
    on = (signal == level).astype(np.int8)
    change = np.diff(on)
    rise = np.flatnonzero(change == 1) + 1
    fall = np.flatnonzero(change == -1) + 1
    if len(rise) == 0:
        return None
    widths = [int(f[0] - r) for r in rise if len(f := fall[fall > r])]
    return Pulses(level, rise, np.array(widths, dtype=np.int64))


def parse_range(text: str) -> tuple[tuple[float, float], tuple[float, float]]:
    """``"30-83kHz,56-76Hz"`` -> ((30e3, 83e3), (56, 76)): line rate and refresh ranges in Hz."""
    unit = {"hz": 1.0, "khz": 1e3, "mhz": 1e6}
    out = []
    for part in text.split(","):
        m = re.fullmatch(r"\s*([0-9.]+)\s*-\s*([0-9.]+)\s*(hz|khz|mhz)\s*", part, re.IGNORECASE)
        if not m:
            raise ValueError(f"a range must look like 30-83kHz, got {part.strip()!r}")
        k = unit[m.group(3).lower()]
        out.append((float(m.group(1)) * k, float(m.group(2)) * k))
    if len(out) != 2:
        raise ValueError(f"give a line-rate range and a refresh range, e.g. 30-83kHz,56-76Hz; got {text!r}")
    return out[0], out[1]


def to_8bit(level: np.ndarray, bits: int) -> np.ndarray:
    """Levels of ``bits`` bits as 8-bit PNG values (:func:`synccore.model.tmds.eight_bit`)."""
    return eight_bit(level, bits).astype(np.uint8)




def watch(pins: Pins, *, monitor_range: Range | None = None, modes: tuple[Mode, ...] | None = None,
          spec: Spec | None = None) -> Monitor:  # fmt: skip
    """Measure, name, lock and sample: everything a monitor does with ``pins``.

    ``spec`` is the timing the design is meant to send (its porches were chosen
    there); without it (a user's own simulation) only the monitor's view is judged.
    """
    hp, vp = _pulses(pins.hsync), _pulses(pins.vsync)
    size = None
    if pins.de is not None and vp is not None and len(vp.leading) >= 2:
        widths = _runs(pins.de, int(vp.leading[0]), int(vp.leading[1]))[1]
        size = (int(np.bincount(widths).argmax()), len(widths)) if len(widths) else None
    mon = read_syncs(pins.period_s, hp, vp, modes=modes, size=size)
    if hp is None or mon.line_cycles is None:
        return mon
    _finish(mon, pins, hp, vp, monitor_range, spec)
    return mon


def read_syncs(period_s: float, hp: Pulses | None, vp: Pulses | None, *,
               modes: tuple[Mode, ...] | None = None,
               size: tuple[int, int] | None = None) -> Monitor:  # fmt: skip
    """Steps 1-3 from the sync pulses alone (and de's size, to find the nearest mode)."""
    mon = Monitor(period_s=period_s, size=size)
    if hp is None or len(hp.leading) < 2:
        mon.problems.append("no hsync: fewer than two hsync pulses seen")
        return mon
    mon.hsync_polarity = "positive" if hp.active_level else "negative"
    periods = np.diff(hp.leading)
    mon.line_cycles = int(np.bincount(periods).argmax())
    if periods.min() != periods.max():
        mon.problems.append(f"jitter: line period varies from {periods.min()} to {periods.max()} clocks")
    if hp.widths.min() != hp.widths.max():
        mon.problems.append(f"jitter: hsync width varies from {hp.widths.min()} to {hp.widths.max()} clocks")
    mon.hsync_cycles = int(hp.widths[0])
    mon.line_rate_hz = 1 / (mon.line_cycles * period_s)
    if vp is None or len(vp.leading) < 2:
        mon.problems.append("no vsync: fewer than two vsync pulses seen, refresh unknown")
        return mon
    mon.vsync_polarity = "positive" if vp.active_level else "negative"
    fperiods = np.diff(vp.leading)
    mon.frame_cycles = int(fperiods[0])
    if fperiods.min() != fperiods.max():
        mon.problems.append(f"jitter: frame period varies from {fperiods.min()} to {fperiods.max()} clocks")
    mon.refresh_hz = 1 / (mon.frame_cycles * period_s)
    lines = Fraction(mon.frame_cycles, mon.line_cycles)
    mon.lines_per_frame = round(lines)
    if lines.denominator != 1:
        mon.problems.append(f"a frame is not a whole number of lines: {float(lines):.3f}")
    mon.vsync_lines = round(vp.widths[0] / mon.line_cycles) if len(vp.widths) else None
    got = Measured(period_s, mon.line_rate_hz, mon.refresh_hz, mon.lines_per_frame, mon.hsync_polarity,
                   mon.vsync_polarity, mon.hsync_cycles, mon.vsync_lines, size)  # fmt: skip
    named = name_mode(got, modes if modes is not None else library())
    mon.mode, mon.also = named.mode, named.also
    mon.nearest, mon.nearest_why = named.nearest, named.nearest_why
    if named.nearest is not None and named.nearest_rates_agree:
        m = named.nearest
        mon.problems.append(f"the rates are those of {m.name} ({m.source}) but the syncs are not: "
                            f"{named.nearest_why}; a monitor may refuse the mode or take it for "
                            "another")  # fmt: skip
    return mon

def _finish(mon: Monitor, pins: Pins, hp: Pulses, vp: Pulses | None, monitor_range: Range | None,
            spec: Spec | None) -> None:  # fmt: skip
    """Steps 4-6: the range, where de puts the picture, locking, sampling and judging."""
    if monitor_range is not None:
        _check_range(mon, monitor_range)
    if vp is None or len(vp.leading) < 2:
        return
    # The frame that begins after the first vsync leading edge.
    v_edge = int(vp.leading[0])
    slack = (mon.line_cycles or 8) // 8
    j0 = int(np.searchsorted(hp.leading, v_edge - slack))
    if j0 >= len(hp.leading):
        mon.problems.append("the run ends before the picture does")
        return
    offset = int(hp.leading[j0]) - v_edge
    if offset:
        mon.notes.append(f"vsync leading edge comes {offset} clocks before the hsync leading edge of "
                         "its line; DMT and CTA-861 put them together")  # fmt: skip
    meant = Place.of(spec.horizontal, spec.vertical) if spec is not None else None
    if pins.de is not None:
        _de_jitter(mon, pins.de, vp)
        mon.place = _de_place(mon, pins.de, hp, j0, int(vp.leading[1]))
        if meant is not None and mon.place is not None:
            _check_meant(mon, mon.place, meant)
    if mon.mode is not None:
        _lock(mon, pins, mon.mode, hp, j0, meant)
    elif pins.de is not None:
        _sample_de(mon, pins, v_edge, int(vp.leading[1]))
    else:
        mon.problems.append("no standard mode and no de: cannot place the picture")


def _check_range(mon: Monitor, monitor_range: Range) -> None:
    (lo, hi), (flo, fhi) = monitor_range
    if mon.line_rate_hz is not None and not lo <= mon.line_rate_hz <= hi:
        mon.problems.append(f"line rate {mon.line_rate_hz / 1e3:.3f} kHz is outside the monitor's "
                            f"{lo / 1e3:g}-{hi / 1e3:g} kHz")  # fmt: skip
    if mon.refresh_hz is not None and not flo <= mon.refresh_hz <= fhi:
        mon.problems.append(f"refresh {mon.refresh_hz:.3f} Hz is outside the monitor's {flo:g}-{fhi:g} Hz")


def _runs(de: np.ndarray, start: int, end: int) -> tuple[np.ndarray, np.ndarray]:
    """Start (from ``start``) and length of each run of de high in ``de[start:end]``."""
    change = np.diff(np.concatenate([[0], de[start:end].astype(np.int8), [0]]))
    rises = np.flatnonzero(change == 1)
    return rises, np.flatnonzero(change == -1) - rises


def _de_place(mon: Monitor, de: np.ndarray, hp: Pulses, j0: int, end: int) -> Place | None:
    """Where de puts the frame's picture (None when de never rises); runs of unequal length are a problem."""
    start = int(hp.leading[j0])
    rises, widths = _runs(de, start, end)
    if len(rises) == 0:
        return None
    if widths.min() != widths.max():
        mon.problems.append(f"de runs differ in length within a frame: {widths.min()} to {widths.max()}")
    first = start + int(rises[0])
    k = int(np.searchsorted(hp.leading, first, side="right")) - 1
    return Place(first - int(hp.leading[k]), k - j0 + 1, int(np.bincount(widths).argmax()), len(rises))


def _check_meant(mon: Monitor, got: Place, meant: Place) -> None:
    """de must be where the spec's porches put it, and of the spec's size."""
    wrong = []
    if got.column != meant.column:
        wrong.append(f"de starts {got.column} clocks after the hsync leading edge, the spec's sync + "
                     f"back porch is {meant.column} (picture shifted by "
                     f"{count(got.column - meant.column, 'pixel')})")  # fmt: skip
    if got.line != meant.line:
        wrong.append(f"de starts {count(got.line, 'line')} after the vsync leading edge's line, the spec's "
                     f"vertical sync + back porch is {meant.line} (picture shifted by "
                     f"{count(got.line - meant.line, 'line')})")  # fmt: skip
    if got.width != meant.width:
        wrong.append(f"de is {got.width} pixels wide, the spec has {meant.width}")
    if got.lines != meant.lines:
        wrong.append(f"de is high on {count(got.lines, 'line')}, the spec has {meant.lines}")
    if wrong:
        mon.problems.append("the design does not send its spec's timing: " + "; ".join(wrong))


def _moved(dx: int, dy: int) -> tuple[str, str]:
    """("7 pixels later and 2 lines lower", "7 pixels left and 2 lines up") for an offset."""
    where, move = [], []
    if dx:
        where.append(f"{count(abs(dx), 'pixel')} {'later' if dx > 0 else 'earlier'}")
        move.append(f"{count(abs(dx), 'pixel')} {'left' if dx > 0 else 'right'}")
    if dy:
        where.append(f"{count(abs(dy), 'line')} {'lower' if dy > 0 else 'higher'}")
        move.append(f"{count(abs(dy), 'line')} {'up' if dy > 0 else 'down'}")
    return " and ".join(where), " and ".join(move)


def _lock(mon: Monitor, pins: Pins, mode: Mode, hp: Pulses, j0: int, meant: Place | None) -> None:
    """Lock on ``mode``: judge de against it, say what a monitor does with the picture's place, sample."""
    h, v = mode.horizontal, mode.vertical
    std = Place.of(h, v)
    got = mon.place
    if got is not None and (got.width, got.lines) != (std.width, std.lines):
        msg = f"de region does not match the {h.active}x{v.active} picture the syncs imply"
        if got.width != std.width:
            msg += f"; de is {got.width} pixels wide, the mode has {h.active}"
        if got.lines != std.lines:
            msg += f"; de is high on {got.lines} of the mode's {v.active} lines"
        mon.problems.append(msg)
    at = got or meant or std
    if mon.line_cycles != h.total:
        mon.notes.append(f"a line has {mon.line_cycles} clocks where {mode.name} has {h.total}: a digital "
                         "input follows the pixel clock; an analog monitor must set its sampling clock "
                         f"to {mon.line_cycles} per line (its auto-adjust does) or it resamples the "
                         "picture")  # fmt: skip
    dx, dy = at.column - std.column, at.line - std.line
    mon.offset = (dx, dy)
    if dx or dy:
        where, move = _moved(dx, dy)
        note = (f"the picture starts {where} than {mode.name} puts it (at {at.column} clocks after the "
                f"hsync leading edge and {at.line} lines after the vsync line; the mode's sync + back "
                f"porch is {std.column} and {std.line}): an analog (VGA) monitor recentres it within its "
                f"adjustment range, moving it {move}; a digital input (DVI, a panel) places it by de "
                "and shows it as sent")  # fmt: skip
        if meant is None:
            note += "; no spec was given to say whether these porches are meant"
        mon.notes.append(note)
    first_line = j0 + at.line - 1
    if first_line + v.active > len(hp.leading):
        return mon.problems.append("the run ends before the picture does")
    idx = hp.leading[first_line:first_line + v.active][:, None] + (at.column + np.arange(h.active))[None, :]
    if idx.max() >= pins.cycles:
        return mon.problems.append("the run ends before the picture does")
    mon.image = _image(pins, idx)
    if not (dx or dy):
        mon.placed_by = f"the syncs and {mode.name}'s porches"
    elif got is not None:
        mon.placed_by = "de, as a digital input does (an analog monitor shows the same once recentred)"
    else:
        mon.placed_by = "the syncs and the spec's porches, recentred as an analog monitor does"


def _de_jitter(mon: Monitor, de: np.ndarray, vp: Pulses) -> None:
    """The picture must start at the same place after every vsync leading edge."""
    rises = np.flatnonzero(np.diff(de.astype(np.int8)) == 1) + 1
    edges = [int(e) for e in vp.leading]
    offsets = []
    for e, nxt in zip(edges, edges[1:] + [len(de)], strict=True):
        after = rises[(rises > e) & (rises < nxt)]
        if len(after) and (nxt < len(de) or len(after) > 1):
            offsets.append(int(after[0]) - e)
    if len(set(offsets)) > 1:
        mon.problems.append(f"jitter: de starts {min(offsets)} to {max(offsets)} clocks after the "
                            "vsync leading edge in different frames")  # fmt: skip


def _sample_de(mon: Monitor, pins: Pins, start: int, end: int) -> None:
    """No mode to lock on: the picture is where de is, as a panel or a digital input takes it."""
    assert pins.de is not None
    rises, widths = _runs(pins.de, start, end)
    if len(rises) == 0:
        return mon.problems.append("de never goes high in a frame: no picture")
    width = int(np.bincount(widths).argmax())
    idx = np.minimum((start + rises)[:, None] + np.arange(width)[None, :], pins.cycles - 1)
    mon.image = _image(pins, idx)
    mon.placed_by = "de (no standard mode to place it by the syncs)"


def _image(pins: Pins, idx: np.ndarray) -> Image.Image:
    rgb = np.stack([to_8bit(pins.red[idx], pins.bits[0]), to_8bit(pins.green[idx], pins.bits[1]),
                    to_8bit(pins.blue[idx], pins.bits[2])], axis=-1)  # fmt: skip
    return Image.fromarray(rgb, "RGB")
