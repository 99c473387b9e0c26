"""A simulated monitor: from sampled display pins to measured rates, a mode name and a picture.

It does what a monitor does with the pins of :class:`synccore.picture.run.Pins`:

1. finds each sync's polarity (the level held for the shorter time is the pulse);
2. measures the line period from hsync leading edges and the frame period from
   vsync leading edges, and the pulse widths; any spread between lines or
   frames is jitter;
3. names the standard mode whose line rate and refresh are within
   :data:`RATE_TOLERANCE`, whose sync polarities, lines per frame and pulse
   widths agree (or says none, and names the nearest);
4. locks on the syncs: with a named mode, it places the picture by the mode's
   back porches counted from the sync leading edges, at the mode's pixel pitch
   (line period / pixels per line), as a monitor's sampling clock would; with
   no mode, it takes the picture where de is high;
5. checks what a monitor would trip on: rates outside the user's range, a de
   region not of the size or place the syncs imply, jitter (line or frame
   period, sync width, or where de starts after vsync, between frames).

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

from synccore.picture.run import Pins
from synccore.timings.modes import Mode, library

RATE_TOLERANCE = 0.01
"""Relative difference in line rate and refresh still taken as the same mode (1 %)."""
WIDTH_TOLERANCE = 0.05
"""Relative difference in hsync pulse width still taken as the same mode."""


@dataclass(frozen=True)
class Pulses:
    active_level: int
    leading: np.ndarray  # sample index of each leading edge
    widths: np.ndarray  # samples of each complete pulse


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
            rows.append(("refresh", f"{self.refresh_hz:.3f} Hz ({self.lines_per_frame} lines)"))
        if self.hsync_polarity:
            rows.append(("hsync", f"{self.hsync_polarity}, {self.hsync_cycles} clocks"))
        if self.vsync_polarity:
            rows.append(("vsync", f"{self.vsync_polarity}, {self.vsync_lines} lines"))
        if self.mode is not None:
            also = "".join(f"; also matches {m.source}" for m in self.also)
            rows.append(("mode", f"{self.mode.name} ({self.mode.source}{also})"))
        else:
            near = f"; nearest {self.nearest.name} ({self.nearest.source}): {self.nearest_why}" \
                if self.nearest else ""
            rows.append(("mode", f"no standard mode{near}"))
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


def _mode_distance(m: Mode, mon: Monitor) -> tuple[bool, float, str]:
    assert mon.line_rate_hz and mon.refresh_hz and mon.hsync_cycles is not None
    dl = abs(mon.line_rate_hz / float(m.line_rate_hz) - 1)
    dr = abs(mon.refresh_hz / float(m.refresh_hz) - 1)
    hs_s = mon.hsync_cycles * mon.period_s
    mode_hs_s = m.horizontal.sync / float(m.pixel_clock_hz)
    dw = abs(hs_s / mode_hs_s - 1)
    why = []
    if dl > RATE_TOLERANCE:
        why.append(f"line rate {float(m.line_rate_hz) / 1e3:.3f} kHz")
    if dr > RATE_TOLERANCE:
        why.append(f"refresh {float(m.refresh_hz):.3f} Hz")
    if m.vertical.total != mon.lines_per_frame:
        why.append(f"{m.vertical.total} lines per frame")
    if m.horizontal.sync_polarity != mon.hsync_polarity:
        why.append(f"hsync {m.horizontal.sync_polarity}")
    if m.vertical.sync_polarity != mon.vsync_polarity:
        why.append(f"vsync {m.vertical.sync_polarity}")
    if m.vertical.sync != mon.vsync_lines:
        why.append(f"vsync {m.vertical.sync} lines")
    if dw > WIDTH_TOLERANCE:
        why.append(f"hsync {m.horizontal.sync} pixels")
    score = dl + dr + dw + 0.5 * len(why)
    return not why, score, "it has " + ", ".join(why) if why else ""


def name_mode(mon: Monitor, modes: tuple[Mode, ...] | None = None) -> None:
    """Fill in ``mon.mode`` (and ``also``) or ``mon.nearest`` from the measured figures."""
    candidates = []
    for m in modes if modes is not None else library():
        ok, score, why = _mode_distance(m, mon)
        candidates.append((not ok, score, m, why))
    candidates.sort(key=lambda c: (c[0], c[1]))
    bad, _, best, why = candidates[0]
    if bad:
        mon.nearest, mon.nearest_why = best, why
        return
    mon.mode = best
    mon.also = tuple(m for b, _, m, _ in candidates[1:] if not b)


def to_8bit(level: np.ndarray, bits: int) -> np.ndarray:
    full = (1 << bits) - 1
    return ((level * 255 + full // 2) // full).astype(np.uint8)


def watch(pins: Pins, *, monitor_range: tuple[tuple[float, float], tuple[float, float]] | None = None,
          modes: tuple[Mode, ...] | None = None) -> Monitor:  # fmt: skip
    """Measure, name, lock and sample: everything a monitor does with ``pins``."""
    hp, vp = _pulses(pins.hsync), _pulses(pins.vsync)
    mon = read_syncs(pins.period_s, hp, vp, modes=modes)
    if hp is None or mon.line_cycles is None:
        return mon
    return _finish(mon, pins, mon.mode, hp, vp, monitor_range)


def read_syncs(period_s: float, hp: Pulses | None, vp: Pulses | None, *,
               modes: tuple[Mode, ...] | None = None) -> Monitor:  # fmt: skip
    """Steps 1-3 from the sync pulses alone: polarities, rates, widths, jitter, the mode's name."""
    mon = Monitor(period_s=period_s)
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
    name_mode(mon, modes)
    return mon


def _finish(mon: Monitor, pins: Pins, mode: Mode | None, hp: Pulses, vp: Pulses | None,
            monitor_range: tuple[tuple[float, float], tuple[float, float]] | None) -> Monitor:  # fmt: skip
    if monitor_range is not None:
        (lo, hi), (flo, fhi) = monitor_range
        if mon.line_rate_hz is not None and not lo <= mon.line_rate_hz <= hi:
            mon.problems.append(f"line rate {mon.line_rate_hz / 1e3:.3f} kHz is outside the monitor's "
                                f"{lo / 1e3:g}-{hi / 1e3:g} kHz")  # fmt: skip
        if mon.refresh_hz is not None and not flo <= mon.refresh_hz <= fhi:
            mon.problems.append(f"refresh {mon.refresh_hz:.3f} Hz is outside the monitor's "
                                f"{flo:g}-{fhi:g} Hz")  # fmt: skip
    if vp is None or len(vp.leading) < 2:
        return mon
    # The frame that begins after the first vsync leading edge.
    v_edge = int(vp.leading[0])
    slack = (mon.line_cycles or 8) // 8
    j0 = int(np.searchsorted(hp.leading, v_edge - slack))
    if j0 >= len(hp.leading):
        mon.problems.append("the run ends before the picture does")
        return mon
    offset = int(hp.leading[j0]) - v_edge
    if offset:
        mon.notes.append(f"vsync leading edge comes {offset} clocks before the hsync leading edge of "
                         "its line; DMT and CTA-861 put them together")  # fmt: skip
    if pins.de is not None:
        _de_jitter(mon, pins.de, vp)
    if mode is not None:
        _sample_mode(mon, pins, mode, hp, j0)
    elif pins.de is not None:
        _sample_de(mon, pins, int(vp.leading[0]), int(vp.leading[1]))
    else:
        mon.problems.append("no standard mode and no de: cannot place the picture")
    return mon


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


def _sample_mode(mon: Monitor, pins: Pins, mode: Mode, hp: Pulses, j0: int) -> None:
    h, v = mode.horizontal, mode.vertical
    first_line = j0 + v.sync + v.back_porch - 1
    if first_line + v.active > len(hp.leading):
        mon.problems.append("the run ends before the picture does")
        return
    assert mon.line_cycles is not None
    pitch = mon.line_cycles / h.total  # samples per mode pixel
    cols = np.round((h.sync + h.back_porch + np.arange(h.active)) * pitch).astype(np.int64)
    starts = hp.leading[first_line:first_line + v.active]
    idx = starts[:, None] + cols[None, :]
    if idx.max() >= pins.cycles:
        mon.problems.append("the run ends before the picture does")
        return
    mon.image = _image(pins, idx)
    mon.placed_by = f"the syncs and {mode.name}'s porches"
    if pins.de is not None:
        de = pins.de[idx]
        if not de.all():
            _de_mismatch(mon, pins, mode, hp, first_line, de)
        # de outside the window the syncs imply
        line_span = hp.leading[first_line - 1:first_line + v.active + 1]
        total_de = int(pins.de[int(line_span[0]):int(line_span[-1])].sum())
        if total_de != int(de.sum()) and de.all():
            mon.problems.append(f"de is high on {total_de - int(de.sum())} pixels outside the "
                                f"{h.active}x{v.active} area the syncs imply")  # fmt: skip


def _de_mismatch(mon: Monitor, pins: Pins, mode: Mode, hp: Pulses, first_line: int, de: np.ndarray) -> None:
    h, v = mode.horizontal, mode.vertical
    assert pins.de is not None and mon.line_cycles is not None
    rows = np.flatnonzero(de.any(axis=1))
    msg = f"de region does not match the {h.active}x{v.active} picture the syncs imply"
    # Where de starts on a line that has it, counted from that line's hsync leading edge.
    for r in rows[:1]:
        line = int(hp.leading[first_line + r])
        run = pins.de[line:line + mon.line_cycles]
        start = int(np.flatnonzero(run)[0]) if run.any() else None
        if start is not None:
            want = h.sync + h.back_porch
            if start != want:
                msg += (f": de starts {start} clocks after the hsync leading edge, the mode's sync + "
                        f"back porch is {want} (picture shifted by {start - want} pixels)")  # fmt: skip
            width = int(np.argmin(run[start:])) if not run[start:].all() else len(run) - start
            if width != h.active:
                msg += f"; de is {width} pixels wide, the mode has {h.active}"
    if len(rows) and rows[0] != 0:
        msg += f"; de begins {rows[0]} lines late"
    if len(rows) and len(rows) != v.active and rows[0] == 0:
        msg += f"; de is high on {len(rows)} of the mode's {v.active} lines"
    if len(rows) == 0:
        msg += "; de is low throughout"
    mon.problems.append(msg)


def _sample_de(mon: Monitor, pins: Pins, start: int, end: int) -> None:
    assert pins.de is not None
    de = pins.de[start:end].astype(np.int8)
    change = np.diff(np.concatenate([[0], de, [0]]))
    rises = np.flatnonzero(change == 1)
    falls = np.flatnonzero(change == -1)
    if len(rises) == 0:
        mon.problems.append("de never goes high in a frame: no picture")
        return
    widths = falls - rises
    width = int(np.bincount(widths).argmax())
    if widths.min() != widths.max():
        mon.problems.append(f"de runs differ in length within a frame: {widths.min()} to {widths.max()}")
    idx = (start + rises)[:, None] + np.arange(width)[None, :]
    idx = np.minimum(idx, pins.cycles - 1)
    mon.image = _image(pins, idx)
    mon.placed_by = "de (no standard mode to place it by the syncs)"


def _image(pins: Pins, idx: np.ndarray) -> Image.Image:
    rgb = np.stack([to_8bit(pins.red[idx], pins.bits[0]), to_8bit(pins.green[idx], pins.bits[1]),
                    to_8bit(pins.blue[idx], pins.bits[2])], axis=-1)  # fmt: skip
    return Image.fromarray(rgb, "RGB")
