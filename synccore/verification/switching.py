"""Judging a multi-mode core: a seeded switching sequence, every cycle, and every frame.

The bench ``sim/multimode_bench.py`` drives a multi-mode core's ``mode`` input with a
sequence from :func:`switching_sequence`, records the outputs after every advancing edge
and judges them twice:

* :func:`compare_cycles`: every output on every cycle against the model
  (:class:`synccore.model.MultiTiming`, which asks each mode's ``Timing.outputs_at``);
* :func:`measure_frames` and :func:`judge_frames`: the run cut into frames at the core's
  own ``frame_start`` pulses, each frame measured (lines, line lengths, sync pulses, de
  runs) and judged against the mode the core says it is in (``mode_active``), and that
  mode against the model's.  These name what went wrong in the trade's words: a torn
  frame, a short line, a runt sync pulse.

Pure Python, no simulator: the bench imports it inside the simulator, the tests on the host.
"""

from __future__ import annotations

import random
from collections.abc import Sequence
from dataclasses import dataclass, fields

from synccore.model import Change, MultiTiming, Outputs, Timing

Sample = tuple[Outputs, int]
"""The outputs and ``mode_active`` after one advancing edge."""


def switching_sequence(mt: MultiTiming, *, seed: int, changes: int = 20, unknown: bool = False,
                       tour: bool = False) -> tuple[list[Change], int]:  # fmt: skip
    """``changes`` changes of the mode input at random advancing edges, and how many edges to run.

    Each change picks another mode than the input held; the gaps between changes range from
    a fifth of the longest frame to one and a half of it, so some changes are overtaken
    before a frame ends (they must have no effect) and some frames repeat their mode.
    ``tour``: the first changes visit modes 1, 2, ... in turn, each held for more than a
    longest frame, so that every mode runs (when ``changes`` reaches the last mode).
    ``unknown``: one change (the middle one, of three or more, after the tour) writes a value
    that names no mode, when the input's width has one.  The run ends two longest frames
    after the last change.
    """
    rng = random.Random(seed)
    longest = max(t.frame_cycles for t in mt.modes)
    visits = mt.count - 1 if tour else 0
    odd_one = max(changes // 2, visits) if unknown and changes >= 3 else -1
    out: list[Change] = []
    edge, value = 0, 0
    for i in range(changes):
        if i < visits:
            edge += longest + rng.randint(1, longest // 2 + 1)
            value = i + 1
        else:
            edge += rng.randint(max(1, longest // 5), longest * 3 // 2)
            value = rng.choice([m for m in range(mt.count) if m != value])
        if i == odd_one and mt.count < 1 << mt.mode_width:
            value = mt.count
        out.append((edge, value))
    return out, edge + 2 * longest


def compare_cycles(samples: Sequence[Sample], mt: MultiTiming, changes: Sequence[Change],
                   limit: int = 10) -> list[str]:  # fmt: skip
    """One line per cycle (at most ``limit``) whose outputs differ from the model's."""
    out = []
    frames = mt.frames(changes, len(samples))
    expected = mt.outputs(changes, len(samples))
    for k, ((got, got_mode), (want, want_mode)) in enumerate(zip(samples, expected, strict=True)):
        if got == want and got_mode == want_mode:
            continue
        frame = max(i for i, f in enumerate(frames) if f.first_edge <= k + 1)
        diff = {f.name: (getattr(got, f.name), getattr(want, f.name))
                for f in fields(Outputs) if getattr(got, f.name) != getattr(want, f.name)}  # fmt: skip
        if got_mode != want_mode:
            diff["mode_active"] = (got_mode, want_mode)
        out.append(f"edge {k + 1} (frame {frame}, position {k + 1 - frames[frame].first_edge} "
                   f"of mode {frames[frame].mode}): got/want {diff}")  # fmt: skip
        if len(out) >= limit:
            break
    return out


def compare_segments(run: Sequence[Segment], mt: MultiTiming, changes: Sequence[Change],
                     limit: int = 10) -> list[str]:  # fmt: skip
    """One line per run of constant outputs (at most ``limit``) whose ends differ from the model:
    every output on its first cycle, every output but x on its last."""
    if not run:
        return []
    frames = mt.frames(changes, run[-1].first_edge + run[-1].length - 1)
    out = []
    for seg in run:
        last = seg.first_edge + seg.length - 1
        for edge, skip in ((seg.first_edge, ()), (last, ("x",))):
            want, want_mode = mt.output_at(frames, edge)
            got = seg.outputs
            diff = {f.name: (getattr(got, f.name), getattr(want, f.name)) for f in fields(Outputs)
                    if f.name not in skip and getattr(got, f.name) != getattr(want, f.name)}  # fmt: skip
            if seg.mode != want_mode:
                diff["mode_active"] = (seg.mode, want_mode)
            if diff:
                out.append(f"edge {edge} (run of {seg.length} cycles from edge {seg.first_edge}): "
                           f"got/want {diff}")  # fmt: skip
                break
        if len(out) >= limit:
            break
    return out


@dataclass(frozen=True)
class FrameFigures:
    """What one frame of a run measured: where it began, its mode, its lines and pulses."""

    index: int
    first_edge: int
    mode: int  # mode_active on the frame's first cycle
    modes_seen: tuple[int, ...]  # every mode_active value during the frame
    lines: tuple[int, ...]  # the length of each line, in cycles (hblank falls to hblank falls)
    hsyncs: tuple[int, ...]  # the width of each hsync pulse at the mode's active level
    vsyncs: tuple[int, ...]
    de_runs: tuple[int, ...]
    open_at_end: tuple[str, ...]  # the signals whose pulse runs over the end of the frame


@dataclass(frozen=True)
class Segment:
    """Cycles in a row whose outputs other than x (and whose ``mode_active``) do not change."""

    first_edge: int
    length: int
    outputs: Outputs  # on the segment's first cycle
    mode: int


def _key(o: Outputs, mode: int) -> tuple[int, ...]:
    return (o.hsync, o.vsync, o.de, o.hblank, o.vblank, o.y, o.line_start, o.frame_start, mode)


def segments(samples: Sequence[Sample]) -> list[Segment]:
    """Per-cycle samples (edge 1 first) run-length coded; x alone does not start a segment."""
    out: list[Segment] = []
    for k, (o, mode) in enumerate(samples):
        if out and _key(out[-1].outputs, out[-1].mode) == _key(o, mode):
            last = out[-1]
            out[-1] = Segment(last.first_edge, last.length + 1, last.outputs, last.mode)
        else:
            out.append(Segment(k + 1, 1, o, mode))
    return out


def _runs(levels: list[tuple[int, int]], level: int) -> tuple[tuple[int, ...], bool]:
    """The lengths of the runs at ``level`` in (length, level) pieces that end inside them (one
    already running where they begin counts from there), and whether one is open at the end."""
    runs, start, at = [], None, 0
    for length, value in levels:
        if value == level and start is None:
            start = at
        elif value != level and start is not None:
            runs.append(at - start)
            start = None
        at += length
    return tuple(runs), start is not None


def measure_frames(run: Sequence[Segment], mt: MultiTiming) -> list[FrameFigures]:
    """Every whole frame of a run (between two ``frame_start`` pulses), measured."""
    starts = [i for i, seg in enumerate(run) if seg.outputs.frame_start]
    modes = mt.modes
    out = []
    for index, (a, b) in enumerate(zip(starts, starts[1:], strict=False)):
        frame = run[a:b]
        mode = frame[0].mode
        t = modes[mode] if mode < len(modes) else modes[0]
        first = frame[0].first_edge
        line_starts = [seg.first_edge - first for i, seg in enumerate(frame) if seg.outputs.hblank == 0
                       and (i == 0 or frame[i - 1].outputs.hblank == 1)]  # fmt: skip
        bounds = [*line_starts, run[b].first_edge - first]

        def levels(name: str, frame: Sequence[Segment] = frame) -> list[tuple[int, int]]:
            return [(seg.length, getattr(seg.outputs, name)) for seg in frame]

        runs = {"hsync": _runs(levels("hsync"), t.hsync_active_level),
                "vsync": _runs(levels("vsync"), t.vsync_active_level),
                "de": _runs(levels("de"), 1)}  # fmt: skip
        out.append(FrameFigures(
            index=index, first_edge=first, mode=mode,
            modes_seen=tuple(sorted({seg.mode for seg in frame})),
            lines=tuple(y - x for x, y in zip(bounds, bounds[1:], strict=False)),
            hsyncs=runs["hsync"][0], vsyncs=runs["vsync"][0], de_runs=runs["de"][0],
            open_at_end=tuple(name for name, (_, still) in runs.items() if still),
        ))  # fmt: skip
    return out


def _judge(f: FrameFigures, t: Timing) -> list[str]:
    """What is wrong with one frame measured against its mode ``t``."""
    out = []
    if f.modes_seen != (f.mode,):
        out.append(f"mode_active changed mid-frame: {' / '.join(map(str, f.modes_seen))}")
    if len(f.lines) != t.v_total:
        out.append(f"a torn frame: line count {len(f.lines)}, mode {f.mode} expects {t.v_total}")
    for what, got, want in (("line", f.lines, t.h_total), ("hsync", f.hsyncs, t.h_sync),
                            ("vsync", f.vsyncs, t.vsync_cycles),
                            ("de run", f.de_runs, t.h_active)):  # fmt: skip
        for width in sorted(set(got) - {want}):
            kind = ("short" if what == "line" else "runt") if width < want else "long"
            out.append(f"a {kind} {what} of {width} cycles, mode {f.mode} expects {want}")
    out += [f"the {name} pulse runs over the end of the frame" for name in f.open_at_end]
    for what, count, expect in (("hsync pulses", len(f.hsyncs), t.v_total),
                                ("vsync pulses", len(f.vsyncs), 1),
                                ("de runs", len(f.de_runs), t.v_active)):  # fmt: skip
        if count != expect:
            out.append(f"{count} {what}, mode {f.mode} expects {expect}")
    return out


def judge_frames(frames: Sequence[FrameFigures], mt: MultiTiming,
                 changes: Sequence[Change]) -> list[str]:  # fmt: skip
    """One line per problem of a measured frame, naming the frame: against its own mode
    (what ``mode_active`` says) and against the model's choice of mode and start."""
    want = {f.first_edge: f.mode for f in mt.frames(changes, frames[-1].first_edge if frames else 0)}
    out = []
    for f in frames:
        if f.mode >= mt.count:
            out.append(f"frame {f.index}: mode_active {f.mode} names no mode")
            continue
        problems = _judge(f, mt.modes[f.mode])
        if f.first_edge not in want:
            problems.append(f"begins at edge {f.first_edge}, where the model has no frame start")
        elif want[f.first_edge] != f.mode:
            problems.append(f"in mode {f.mode}, the model wants mode {want[f.first_edge]} "
                            "(the mode input read at the end of the frame before)")  # fmt: skip
        out += [f"frame {f.index} (edge {f.first_edge}): {p}" for p in problems]
    return out
