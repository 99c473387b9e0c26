"""The multi-mode model: which mode each frame is in, and every output on every cycle.

A multi-mode core (a spec with ``modes:``) runs one of its modes at a time.  What each
output does inside a frame is the single-mode contract of that frame's mode, and
:meth:`synccore.model.Timing.outputs_at` of the mode stays its only oracle; this module
says only which mode each frame is in.

The switching rule.

* Advancing edges are counted from reset: after the ``k``-th one the outputs show the
  ``k-1``-th position since reset (as in :mod:`synccore.model.timing`).
* The core reads its ``mode`` input on exactly one advancing edge per frame: the edge
  after which the outputs show the frame's last position (the last back-porch cycle of
  its last line).  That edge begins the frame's last cycle.
* The mode read there takes effect on the next advancing edge, the first of the next
  frame: from it on every output, and ``mode_active``, belong to the new mode.  So the
  first frame after a switch is a whole frame of the new mode; no frame is cut short and
  no sync pulse is cut (every mode's syncs end inside their line and frame, which the
  spec's rules make sure of).
* A value of ``mode`` that names no mode (``>= len(modes)``) is ignored: the core stays
  in its mode.
* Reset puts the core into mode 0, whatever ``mode`` holds: the reset values are those
  of mode 0 and the first frame after reset is a frame of mode 0.  (A constant reset
  value also suits asynchronous resets.)  The input is first read at the end of that frame.
"""

from __future__ import annotations

import bisect
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from functools import cached_property

from synccore.model.fields import bits_for
from synccore.model.timing import Outputs, Timing
from synccore.spec import Spec

Change = tuple[int, int]
"""A change of the ``mode`` input: (advancing edge from which it holds, value)."""


@dataclass(frozen=True)
class Frame:
    """One frame of a run: the advancing edge that shows its first position, and its mode."""

    first_edge: int
    mode: int
    cycles: int

    @property
    def last_edge(self) -> int:
        """The edge after which the outputs show this frame's last position (where ``mode`` is read)."""
        return self.first_edge + self.cycles - 1


@dataclass(frozen=True)
class MultiTiming:
    """The modes of a multi-mode spec and the switching rule between them."""

    spec: Spec

    def __post_init__(self) -> None:
        if len(self.spec.modes) < 2:
            raise ValueError(f"a multi-mode spec lists at least 2 modes, got {len(self.spec.modes)}")

    @cached_property
    def modes(self) -> tuple[Timing, ...]:
        """Each mode's timing model, in the order of the spec's ``modes:``."""
        return tuple(Timing(m) for m in self.spec.modes)

    @property
    def count(self) -> int:
        return len(self.spec.modes)

    @property
    def mode_width(self) -> int:
        """Bits of the ``mode`` input and the ``mode_active`` output."""
        return bits_for(self.count - 1)

    @property
    def h_width(self) -> int:
        """Bits of the column counter: enough for the longest line."""
        return max(t.h_width for t in self.modes)

    @property
    def v_width(self) -> int:
        return max(t.v_width for t in self.modes)

    @property
    def x_width(self) -> int:
        return max(t.x_width for t in self.modes)

    @property
    def y_width(self) -> int:
        return max(t.y_width for t in self.modes)

    def reset_outputs(self) -> Outputs:
        """What every output holds during reset: mode 0's reset values (``mode_active`` = 0)."""
        return self.modes[0].reset_outputs()

    def chosen(self, value: int, current: int) -> int:
        """The mode a frame boundary switches to when the input reads ``value``."""
        return value if 0 <= value < self.count else current

    def frames(self, changes: Sequence[Change], edges: int) -> list[Frame]:
        """Every frame that begins within ``edges`` advancing edges after reset, in order.

        ``changes`` say from which advancing edge the ``mode`` input holds which value
        (sorted by edge; before the first change it holds 0).
        """
        at = [edge for edge, _ in changes]
        values = [value for _, value in changes]

        def input_at(edge: int) -> int:
            i = bisect.bisect_right(at, edge) - 1
            return values[i] if i >= 0 else 0

        out: list[Frame] = []
        first, mode = 1, 0
        timings = self.modes
        while first <= edges:
            frame = Frame(first, mode, timings[mode].frame_cycles)
            out.append(frame)
            mode = self.chosen(input_at(frame.last_edge), mode)
            first = frame.last_edge + 1
        return out

    def outputs(self, changes: Sequence[Change], edges: int) -> Iterator[tuple[Outputs, int]]:
        """(outputs, mode_active) after each advancing edge 1 .. ``edges``, in order."""
        timings = self.modes
        for frame in self.frames(changes, edges):
            t = timings[frame.mode]
            for q in range(min(frame.cycles, edges - frame.first_edge + 1)):
                yield t.outputs_at(q), frame.mode


    def output_at(self, frames: Sequence[Frame], edge: int) -> tuple[Outputs, int]:
        """(outputs, mode_active) after advancing edge ``edge`` of a run cut into ``frames``
        (from :meth:`frames` for at least that many edges)."""
        i = bisect.bisect_right([f.first_edge for f in frames], edge) - 1
        if i < 0:
            return self.reset_outputs(), 0
        frame = frames[i]
        return self.modes[frame.mode].outputs_at(edge - frame.first_edge), frame.mode


def multi_timing(spec: Spec) -> MultiTiming:
    """The multi-mode model of a validated spec with ``modes:``."""
    return MultiTiming(spec)
