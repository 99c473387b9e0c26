"""Stage 5: measuring a running core from its signal edges, and judging it against the spec.

A simulator (through the cocotb bench in ``sim/``) or the built-in engine records
an :class:`Event` whenever hsync, vsync or de changes.  :func:`measure` turns
the events into figures (widths, porches, polarities, ranges, strobe counts),
:func:`expected` says what the reference model wants for each, and
:func:`compare` lays both side by side.  The events carry the count of
advancing clock edges, so an irregular clock enable changes nothing here.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from synccore.model import Timing

# The monitored values, in the order of an event line (and least significant
# field first where they are packed into one vector): (name, bits).
MONITOR_FIELDS: tuple[tuple[str, int], ...] = (
    ("adv", 32),  # advancing clock edges since reset
    ("hsync", 1),
    ("vsync", 1),
    ("de", 1),
    ("hblank", 1),
    ("vblank", 1),
    ("frame_start", 1),
    ("line_start", 1),
    ("x", 16),  # x delayed by the lead, so it lines up with de
    ("y", 16),
    ("x_last", 16),  # x on the last de cycle seen
    ("step_faults", 16),  # cycles inside a de run where x did not advance by N or y changed
    ("line_starts", 16),  # line_start pulses so far (modulo 2**16)
    ("frame_starts", 16),
)


def stop_count(t: Timing, frames: int) -> int:
    """Advancing edges a measurement runs for: the frames, plus two lines to see the next start."""
    return frames * t.frame_cycles + 2 * t.h_total


@dataclass(frozen=True)
class Event:
    """Every monitored value just after a change of hsync, vsync or de."""

    adv: int
    hsync: int
    vsync: int
    de: int
    hblank: int
    vblank: int
    frame_start: int
    line_start: int
    x: int
    y: int
    x_last: int
    step_faults: int
    line_starts: int
    frame_starts: int


def parse_events(text: str) -> list[Event]:
    """Events from a harness's event file: one line of integers per event, in field order."""
    names = [name for name, _ in MONITOR_FIELDS]
    out = []
    for line in text.splitlines():
        values = [int(v) for v in line.split()]
        if len(values) == len(names):
            out.append(Event(**dict(zip(names, values, strict=True))))
    return out


def decode(word: int) -> Event:
    """Unpack one monitor vector read from the harness."""
    values = {}
    for name, bits in MONITOR_FIELDS:
        values[name] = word & ((1 << bits) - 1)
        word >>= bits
    return Event(**values)


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
LABELS = {key: (label, unit) for key, label, unit in QUANTITIES}


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


def measure(events: Sequence[Event], t: Timing) -> dict[str, Figure]:
    """Figures measured from the events of a run of at least two frames."""
    ppc = t.ppc
    found: dict[str, set[object]] = {key: set() for key, _, _ in QUANTITIES}

    de_runs = [(s, e) for s, e in _pulses(events, "de", 1) if e is not None]
    if de_runs:
        found["first_de"].add(de_runs[0][0])
    # Polarity: a sync's idle level is the level it holds for most of the time de is high
    # (vsync may overlap the first active line when the vertical back porch is 0).
    h_idle = _idle_level(events, "hsync")
    v_idle = _idle_level(events, "vsync")
    h_active_level = 1 - min(h_idle) if len(h_idle) == 1 else t.hsync_active_level
    v_active_level = 1 - min(v_idle) if len(v_idle) == 1 else t.vsync_active_level
    hs = [(s, e) for s, e in _pulses(events, "hsync", h_active_level) if e is not None]
    vs = [(s, e) for s, e in _pulses(events, "vsync", v_active_level) if e is not None]

    for (s1, _), (s2, _) in zip(hs, hs[1:], strict=False):
        found["hsync_period"].add((s2 - s1) * ppc)
    for s, e in hs:
        found["hsync_width"].add((e - s) * ppc)
    rises = [s for s, _ in de_runs]
    # Lines are told apart by hblank, which falls at every line start, active or not.
    hblanks = _pulses(events, "hblank", 1)
    line_starts = [e for _, e in hblanks if e is not None]
    periods = [b - a for a, b in zip(line_starts, line_starts[1:], strict=False)]
    line_total = max(set(periods), key=periods.count) if periods else 0
    found["line_total"].update(p * ppc for p in periods)
    for b_start, b_end in hblanks:
        if b_end is not None and b_start > 0:
            found["hblank_width"].add((b_end - b_start) * ppc)
    if line_total:
        for b_start, b_end in _pulses(events, "vblank", 1):
            if b_end is not None and b_start > 0:
                found["vblank_width"].add(_lines(b_end - b_start, line_total))
    found["de_vs_blanks"].add(
        "yes" if all(e.de == 1 - (e.hblank | e.vblank) for e in events[1:]) else "no")  # fmt: skip
    for s, e in de_runs:
        found["h_active"].add((e - s) * ppc)
    # Porches around every hsync pulse, active line or not: from the blanking start (hblank
    # rising) to the pulse, and from the pulse to the next line start (hblank falling).
    blank_starts = [s for s, _ in hblanks if s > 0]
    for s, e in hs:
        before = [b for b in blank_starts if b <= s]
        if before and s - before[-1] < max(line_total, 1):
            found["h_front"].add((s - before[-1]) * ppc)
        after = [ls for ls in line_starts if ls >= e]
        if after and after[0] - e < max(line_total, 1):
            found["h_back"].add((after[0] - e) * ppc)

    # Frames: the de runs between consecutive vsync pulses.
    if line_total:
        for (s, e), nxt in zip(vs, [*vs[1:], None], strict=False):
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

    # Per frame, from one frame's first de rise to the next: coordinates and strobes.
    by_adv = {e.adv: e for e in events}
    frame_firsts = [r for i, r in enumerate(rises) if i == 0 or r - rises[i - 1] > line_total]
    lead = t.spec.core.lead if t.spec.core.lead > 1 else 0
    for start, stop in zip(frame_firsts, frame_firsts[1:], strict=False):
        runs = [(s, e) for s, e in de_runs if start <= s < stop]
        found["v_active"].add(len(runs))
        # Right after reset a pixel pipeline of latency `lead` (the harness's delay line)
        # still passes on the coordinates the core held in reset for lead - 1 pixels: the
        # coordinates of a frame that begins that early are not judged.
        if start > lead:
            rows = [by_adv[s].y for s, _ in runs]
            firsts = {by_adv[s].x for s, _ in runs}
            lasts = {by_adv[e].x_last for _, e in runs}
            found["x_range"].add(f"{min(firsts)}..{max(lasts)}"
                                 if len(firsts) == 1 and len(lasts) == 1
                                 else f"{sorted(firsts)}..{sorted(lasts)}")  # fmt: skip
            s = t.scale_shift  # with core.scale each row number repeats 2**s times
            steady = rows == [((rows[0] << s) + i) >> s for i in range(len(rows))]
            found["y_range"].add(f"{rows[0]}..{rows[-1]}" if steady else f"irregular {rows[:6]}")
        found["line_start"].add((by_adv[stop].line_starts - by_adv[start].line_starts) % 65536)
        found["frame_start"].add((by_adv[stop].frame_starts - by_adv[start].frame_starts) % 65536)
        found["line_start_aligned"].add(
            "yes" if all(by_adv[s].line_start for s, _ in runs) else "no")  # fmt: skip
        found["frame_start_aligned"].add(
            "yes" if by_adv[start].frame_start and not any(by_adv[s].frame_start for s, _ in runs[1:])
            else "no")  # fmt: skip
    if events:
        found["xy_steps"].add(events[-1].step_faults)
    found["hsync_polarity"] = set(_polarity(h_idle))
    found["vsync_polarity"] = set(_polarity(v_idle))

    return {
        key: Figure(key, label, unit, tuple(sorted(found[key], key=_sort_key)))
        for key, label, unit in QUANTITIES
    }


def _lines(cycles: int, line_total: int) -> object:
    return cycles // line_total if cycles % line_total == 0 else f"{cycles}/{line_total} cycles"


def _sort_key(value: object) -> tuple[int, str]:
    return (0, f"{value:012d}") if isinstance(value, int) else (1, str(value))


def expected(t: Timing) -> dict[str, object]:
    """What the reference model says each measured quantity must be."""
    h, v = t.spec.horizontal, t.spec.vertical
    return {
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
    for key, label, unit in QUANTITIES:
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
