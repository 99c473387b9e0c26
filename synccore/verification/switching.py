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


def switching_sequence(mt: MultiTiming, *, seed: int, changes: int = 20,
                       unknown: bool = False) -> tuple[list[Change], int]:  # fmt: skip
    """``changes`` changes of the mode input at random advancing edges, and how many edges to run.

    Each change picks another mode than the input held; the gaps between changes range from
    a fifth of the longest frame to one and a half of it, so some changes are overtaken
    before a frame ends (they must have no effect) and some frames repeat their mode.
    ``unknown``: one change (the middle one) writes a value that names no mode, when the
    input's width has one.  The run ends two longest frames after the last change.
    """
    rng = random.Random(seed)
    longest = max(t.frame_cycles for t in mt.modes)
    out: list[Change] = []
    edge, value = 0, 0
    for i in range(changes):
        edge += rng.randint(max(1, longest // 5), longest * 3 // 2)
        value = rng.choice([m for m in range(mt.count) if m != value])
        if unknown and i == changes // 2 and mt.count < 1 << mt.mode_width:
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


def _runs(levels: list[int], level: int) -> tuple[tuple[int, ...], bool]:
    """The lengths of the runs at ``level`` that end inside ``levels`` (one that was already
    running when they begin counts from there), and whether a run is still open at the end."""
    runs, start = [], None
    for i, value in enumerate(levels):
        if value == level and start is None:
            start = i
        elif value != level and start is not None:
            runs.append(i - start)
            start = None
    return tuple(runs), start is not None


def measure_frames(samples: Sequence[Sample], mt: MultiTiming) -> list[FrameFigures]:
    """Every whole frame of a run (between two ``frame_start`` pulses), measured."""
    starts = [k for k, (o, _) in enumerate(samples) if o.frame_start]
    modes = mt.modes
    out = []
    for index, (a, b) in enumerate(zip(starts, starts[1:], strict=False)):
        frame = samples[a:b]
        mode = frame[0][1]
        t = modes[mode] if mode < len(modes) else modes[0]
        line_starts = [i for i in range(len(frame))
                       if frame[i][0].hblank == 0 and (i == 0 or frame[i - 1][0].hblank == 1)]  # fmt: skip
        bounds = [*line_starts, len(frame)]
        runs = {
            "hsync": _runs([o.hsync for o, _ in frame], t.hsync_active_level),
            "vsync": _runs([o.vsync for o, _ in frame], t.vsync_active_level),
            "de": _runs([o.de for o, _ in frame], 1),
        }
        out.append(FrameFigures(
            index=index, first_edge=a + 1, mode=mode,
            modes_seen=tuple(sorted({m for _, m in frame})),
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
    out += [f"a {name} pulse runs over the end of the frame" for name in f.open_at_end]
    for what, got, want in (("hsync pulses", len(f.hsyncs), t.v_total),
                            ("vsync pulses", len(f.vsyncs), 1),
                            ("de runs", len(f.de_runs), t.v_active)):  # fmt: skip
        if got != want:
            out.append(f"{got} {what}, mode {f.mode} expects {want}")
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
