"""The rules of interlace: fields, their lines, where each field's vsync starts.

:class:`FieldRules` is a part of :class:`synccore.model.Timing` (its base class), kept
apart to keep the timing module short.

Interlace.  An interlaced timing (``spec.interlaced``) has two fields per frame;
``vertical`` describes one field as the standard's tables do (CTA-861-G Table 1 and
the 1080i/480i/576i timing figures: 540/2/5/15 lines for 1080i).  Each field
starts, like a frame, at its first active pixel.  Field 0 comes first after reset
and carries the even frame rows (y = 0, 2, 4, ...); the vertical blanking after it
is the standard's one between field 1 and field 2: its vsync starts half a line
(``h_total / 2`` cycles) later than the line's vsync column and its back porch is one
line longer, so field 0 has ``v_total + 1`` lines.  Field 1 carries the odd rows
(y = 1, 3, 5, ...), has ``v_total`` lines and its vsync where a progressive frame has
it.  A frame is ``2 v_total + 1`` lines.  ``field`` shows the field of the position;
``frame_start`` marks the first active pixel of field 0 only, ``line_start`` every
active line of both fields.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, overload

from synccore.spec import Spec

if TYPE_CHECKING:
    import numpy as np
    from numpy.typing import NDArray

    Cycles = NDArray[np.int64]


def bits_for(max_value: int) -> int:
    """Width of an unsigned register that holds ``0..max_value``; at least 1."""
    return max(1, int(max_value).bit_length())


class FieldRules:
    """Interlace figures; :class:`~synccore.model.Timing` supplies the per-field numbers."""

    spec: Spec

    # Supplied by Timing.
    @property
    def h_total(self) -> int:
        raise NotImplementedError

    @property
    def v_total(self) -> int:
        raise NotImplementedError

    @property
    def v_active(self) -> int:
        raise NotImplementedError

    @property
    def v_sync_start(self) -> int:
        raise NotImplementedError

    @property
    def v_sync_at_h(self) -> int:
        raise NotImplementedError

    @property
    def interlaced(self) -> bool:
        return self.spec.interlaced

    @property
    def fields(self) -> int:
        """Fields per frame: 2 when interlaced, else 1."""
        return 2 if self.interlaced else 1

    def field_lines(self, f: int) -> int:
        """Lines of field ``f``: field 0 of an interlaced timing has one back-porch line more."""
        return self.v_total + 1 if self.interlaced and f == 0 else self.v_total

    @property
    def frame_lines(self) -> int:
        """Lines per frame: ``v_total``, or ``2 v_total + 1`` when interlaced."""
        return sum(self.field_lines(f) for f in range(self.fields))

    @property
    def half_line(self) -> int:
        """Half a line in cycles: how much later field 0's vsync starts (interlaced)."""
        return self.h_total // 2

    def vsync_at(self, f: int) -> tuple[int, int]:
        """(line within field ``f``, column in cycles) at which its vsync pulse starts.

        Field 0 of an interlaced timing: half a line after the progressive place,
        carried into the next line when it passes the line's end.
        """
        if not (self.interlaced and f == 0):
            return self.v_sync_start, self.v_sync_at_h
        column = self.v_sync_at_h + self.half_line
        return self.v_sync_start + column // self.h_total, column % self.h_total

    def vsync_starts(self) -> tuple[int, ...]:
        """Position (from a frame's first active pixel) of each field's vsync leading edge."""
        starts, field_start = [], 0
        for f in range(self.fields):
            line, column = self.vsync_at(f)
            starts.append(field_start + line * self.h_total + column)
            field_start += self.field_lines(f) * self.h_total
        return tuple(starts)

    @property
    def frame_rows(self) -> int:
        """Active rows of a whole frame: both fields' when interlaced."""
        return self.v_active * self.fields

    @overload
    def field_of(self, q: int) -> int: ...
    @overload
    def field_of(self, q: Cycles) -> Cycles: ...
    def field_of(self, q: int | Cycles) -> int | Cycles:
        """The field (0 or 1) position ``q`` lies in; always 0 for a progressive timing."""
        if not self.interlaced:
            return q * 0
        return ((q // self.h_total) % self.frame_lines >= self.field_lines(0)) * 1

