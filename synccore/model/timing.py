"""The timing model — every derived number, and the cycle-by-cycle reference.

This module is the oracle.  :class:`Timing` derives all counts (in clock
cycles, after dividing the horizontal figures by pixels_per_clock) and rates
from a :class:`~synccore.spec.Spec`.  :func:`outputs_at` says, declaratively,
what every output of a core must be after a given number of advancing clock
edges since reset; the emitters, the simulator benches and every test rely
on it and on nothing else.

Positions.  A *position* counts advancing cycles from the first active pixel
of a frame: position ``q`` is column ``q mod H`` of line ``(q div H) mod V``
(in cycles).  The output registers show position ``q`` after the ``q+1``-th
advancing clock edge since reset; during reset and before the first advance
they show the reset values (de=0, syncs inactive, blanks high, x=y=0,
strobes low).

Interlace: see :mod:`synccore.model.fields`.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, overload

from synccore.model.fields import FieldRules, bits_for
from synccore.spec import Spec

if TYPE_CHECKING:
    import numpy as np
    from numpy.typing import NDArray

    Cycles = NDArray[np.int64]
    """Many positions or columns at once: the same rules, applied element by element."""
    Flags = NDArray[np.bool_]


@dataclass(frozen=True)
class Outputs:
    """The value of every output port of a core on one clock cycle."""

    hsync: int
    vsync: int
    de: int
    hblank: int
    vblank: int
    x: int
    y: int
    line_start: int
    frame_start: int
    field: int = 0  # 0 on every cycle of a progressive timing


@dataclass(frozen=True)
class Timing(FieldRules):
    """All numbers derived from a spec; horizontal counts are in clock cycles."""

    spec: Spec

    # ------------------------------------------------------------- raw figures
    @property
    def ppc(self) -> int:
        return self.spec.core.pixels_per_clock

    @property
    def h_active(self) -> int:
        return self.spec.horizontal.active // self.ppc

    @property
    def h_front(self) -> int:
        return self.spec.horizontal.front_porch // self.ppc

    @property
    def h_sync(self) -> int:
        return self.spec.horizontal.sync // self.ppc

    @property
    def h_back(self) -> int:
        return self.spec.horizontal.back_porch // self.ppc

    @property
    def h_total(self) -> int:
        """Cycles per line."""
        return self.h_active + self.h_front + self.h_sync + self.h_back

    @property
    def h_last(self) -> int:
        """Last cycle of a line: the column counter's terminal count."""
        return self.h_total - 1

    @property
    def h_sync_start(self) -> int:
        """First cycle of the hsync pulse: the active cycles and the front porch come before it."""
        return self.spec.horizontal.sync_start // self.ppc

    @property
    def h_sync_stop(self) -> int:
        """One past the last cycle of the hsync pulse, not wrapped (``h_total`` when back porch is 0).

        Column ``h`` of a line is in the pulse when ``h_sync_start <= h < h_sync_stop``.
        """
        return self.h_sync_start + self.h_sync

    @property
    def h_sync_end(self) -> int:
        """First cycle after the hsync pulse, wrapped into the line (0 when back porch is 0)."""
        return self.h_sync_stop % self.h_total

    @property
    def v_active(self) -> int:
        return self.spec.vertical.active

    @property
    def v_total(self) -> int:
        return self.spec.vertical.total

    @property
    def v_last(self) -> int:
        """Last line of a frame: the line counter's terminal count."""
        return self.v_total - 1

    @property
    def v_sync_start(self) -> int:
        """First line of the vsync pulse: the active lines and the front porch come before it."""
        return self.spec.vertical.sync_start

    @property
    def v_sync_stop(self) -> int:
        """One past the last line of the vsync pulse, not wrapped (``v_total`` when back porch is 0)."""
        return self.v_sync_start + self.spec.vertical.sync

    @property
    def v_sync_end(self) -> int:
        """First line after the vsync pulse, wrapped into the frame (0 when back porch is 0)."""
        return self.v_sync_stop % self.v_total

    @property
    def v_sync_at_h(self) -> int:
        """Cycle within a line at which vsync changes: the hsync leading edge, or 0."""
        return self.h_sync_start if self.spec.core.vsync_align == "hsync" else 0

    @property
    def vsync_first(self) -> int:
        """Position of the first vsync leading edge after reset."""
        return self.v_sync_start * self.h_total + self.v_sync_at_h

    @property
    def vsync_cycles(self) -> int:
        """Length of a vsync pulse in cycles."""
        return self.spec.vertical.sync * self.h_total

    @property
    def frame_cycles(self) -> int:
        """Cycles per frame (both fields when interlaced)."""
        return self.h_total * self.frame_lines

    def sync_span(self, axis: str) -> tuple[int, int]:
        """Where the sync pulse of ``axis`` lies, in the spec's units, counted from the first active one.

        ``"horizontal"``: (first pixel of hsync, one past its last pixel) within a line;
        ``"vertical"``: (first line of vsync, one past its last line) within a frame.
        """
        if axis == "horizontal":
            return self.h_sync_start * self.ppc, self.h_sync_stop * self.ppc
        if axis == "vertical":
            return self.v_sync_start, self.v_sync_stop
        raise ValueError(f"axis must be 'horizontal' or 'vertical', got {axis!r}")

    @property
    def hsync_active_level(self) -> int:
        """hsync's level during the pulse: 1 for positive polarity, 0 for negative."""
        return 1 if self.spec.horizontal.sync_polarity == "positive" else 0

    @property
    def hsync_inactive_level(self) -> int:
        """hsync's level outside the pulse, and during reset."""
        return 1 - self.hsync_active_level

    @property
    def vsync_active_level(self) -> int:
        """vsync's level during the pulse: 1 for positive polarity, 0 for negative."""
        return 1 if self.spec.vertical.sync_polarity == "positive" else 0

    @property
    def vsync_inactive_level(self) -> int:
        """vsync's level outside the pulse, and during reset."""
        return 1 - self.vsync_active_level

    # ------------------------------------------------------------------ widths
    @property
    def h_width(self) -> int:
        return bits_for(self.h_total - 1)

    @property
    def v_width(self) -> int:
        """Bits of the line counter: it counts up to ``v_total`` in field 0 of an interlaced timing."""
        return bits_for(self.field_lines(0) - 1)

    @property
    def scale_shift(self) -> int:
        """x and y are divided by core.scale: a right shift by this many bits."""
        return self.spec.core.scale.bit_length() - 1

    @property
    def x_width(self) -> int:
        return bits_for((self.spec.horizontal.active - 1) >> self.scale_shift)

    @property
    def y_width(self) -> int:
        return bits_for((self.frame_rows - 1) >> self.scale_shift)

    @property
    def x_shift(self) -> int:
        """Zero bits appended below the cycle column: x = (column * pixels_per_clock) >> scale."""
        return max(0, self.ppc.bit_length() - 1 - self.scale_shift)

    @property
    def x_count_lsb(self) -> int:
        """Lowest bit of the cycle column that x shows (when scale exceeds pixels_per_clock)."""
        return max(0, self.scale_shift - (self.ppc.bit_length() - 1))

    @property
    def x_step(self) -> int:
        """How much x grows per cycle inside a de run; 0: it holds for some cycles, then grows by 1."""
        return self.ppc >> self.scale_shift

    # -------------------------------------------------------------------- lead
    @property
    def lead(self) -> int:
        """Cycles by which x/y run ahead of de and the syncs: the latency of the pixel
        pipeline they are meant for (a colour made from x/y through that many registers meets de)."""
        return self.spec.core.lead

    @property
    def lead_reset(self) -> tuple[int, int]:
        """(column, line) in cycles of the position ``lead`` cycles after the first active pixel.

        The lead-shifted position counter starts here after reset: x/y show it while de
        shows position 0.
        """
        return self.lead_position(0)

    @property
    def reset_xy_pixels(self) -> int:
        """Pixels of the first frame after reset that carry the reset coordinates (x = y = 0).

        A pixel pipeline of latency ``lead`` still holds what it was fed during reset
        for its first ``lead`` positions; position 0's own coordinates are 0, 0, so only
        positions 1 .. lead - 1 are wrong: ``lead - 1`` of them (none when lead <= 1).
        """
        return max(0, self.lead - 1)

    @property
    def exact_xy_from(self) -> int:
        """First position from which x/y, seen through a pixel pipeline of latency ``lead``,
        are exact on every later position too: just after the last of the
        :attr:`reset_xy_pixels` (0 when there are none)."""
        return self.reset_xy_pixels + 1 if self.reset_xy_pixels else 0

    @property
    def xy_steps_judged_after(self) -> int:
        """Advancing edges after which a bench can judge the steps of x/y through the pipeline.

        Once ``n`` edges have passed the outputs show position ``n - 1``, and the step into
        it from position ``n - 2`` is exact when ``n - 2 >= exact_xy_from``: a bench that has
        counted ``n`` edges judges that step when ``n`` exceeds this figure.
        """
        return self.exact_xy_from + 1

    def alignment_delays(self, stages: int) -> tuple[int, int]:
        """(sync delay, colour delay) that line up a colour made from x/y by ``stages`` registers.

        The colour leaves such a pipeline ``stages`` cycles after x/y, which lead de by
        ``lead`` cycles: when the pipeline is the longer, hsync, vsync and de wait
        ``stages - lead`` cycles for the colour; when the lead is the longer, the colour
        waits ``lead - stages`` cycles for de. One of the two is always 0.
        """
        return max(0, stages - self.lead), max(0, self.lead - stages)

    # ------------------------------------------------------------------- rates
    @property
    def pixel_clock_hz(self) -> Fraction:
        return self.spec.pixel_clock_hz

    @property
    def core_clock_hz(self) -> Fraction:
        """Clock of the core: the pixel clock divided by pixels_per_clock."""
        return self.spec.pixel_clock_hz / self.ppc

    @property
    def line_rate_hz(self) -> Fraction:
        return self.spec.pixel_clock_hz / self.spec.horizontal.total

    @property
    def refresh_hz(self) -> Fraction:
        """Vertical rate: frames per second, or fields per second when interlaced."""
        return self.line_rate_hz * self.fields / self.frame_lines

    @property
    def frame_rate_hz(self) -> Fraction:
        """Whole frames per second (half the field rate when interlaced)."""
        return self.line_rate_hz / self.frame_lines

    @property
    def blanking_share(self) -> Fraction:
        """Share of the frame's pixel periods that are not visible (both fields when interlaced)."""
        h, v = self.spec.horizontal, self.spec.vertical
        return 1 - Fraction(h.active * v.active * self.fields, h.total * self.frame_lines)

    # --------------------------------------------------------------- reference
    def outputs_at(self, q: int) -> Outputs:
        """Outputs after the ``q+1``-th advancing edge since reset, i.e. showing position ``q``.

        ``q = -1`` gives the reset values.
        """
        if q < 0:
            return self.reset_outputs()
        h, v = self.position(q)
        hl, vl = self.lead_position(q)
        f = self.field_of(q)
        active_h, active_v = h < self.h_active, v < self.v_active
        return Outputs(
            hsync=self.hsync_active_level if self.in_hsync(h) else self.hsync_inactive_level,
            vsync=self.vsync_active_level if self.in_vsync(q) else self.vsync_inactive_level,
            de=int(active_h and active_v),
            hblank=int(not active_h),
            vblank=int(not active_v),
            x=((hl * self.ppc) >> self.scale_shift) if hl < self.h_active else 0,
            y=((vl * self.fields + f) >> self.scale_shift) if vl < self.v_active else 0,
            line_start=int(h == 0 and active_v),
            frame_start=int(h == 0 and v == 0 and f == 0),
            field=f,
        )

    def reset_outputs(self) -> Outputs:
        """What every output holds during reset."""
        return Outputs(
            hsync=self.hsync_inactive_level,
            vsync=self.vsync_inactive_level,
            de=0,
            hblank=1,
            vblank=1,
            x=0,
            y=0,
            line_start=0,
            frame_start=0,
        )

    @overload
    def position(self, q: int) -> tuple[int, int]: ...
    @overload
    def position(self, q: Cycles) -> tuple[Cycles, Cycles]: ...
    def position(self, q: int | Cycles) -> tuple[int | Cycles, int | Cycles]:
        """(column in cycles, line) of position ``q``: ``q`` cycles after a frame's first active pixel.

        Interlaced: the line within its field (:meth:`field_of` says which).
        """
        if not self.interlaced:
            return q % self.h_total, (q // self.h_total) % self.v_total
        line = (q // self.h_total) % self.frame_lines
        second = line >= self.field_lines(0)
        return q % self.h_total, line - second * self.field_lines(0)

    @overload
    def lead_position(self, q: int) -> tuple[int, int]: ...
    @overload
    def lead_position(self, q: Cycles) -> tuple[Cycles, Cycles]: ...
    def lead_position(self, q: int | Cycles) -> tuple[int | Cycles, int | Cycles]:
        """(column, line) whose coordinates x/y show while the other outputs show position ``q``:
        the position ``lead`` cycles later."""
        return self.position(q + self.lead)

    @overload
    def in_hsync(self, h: int) -> bool: ...
    @overload
    def in_hsync(self, h: Cycles) -> Flags: ...
    def in_hsync(self, h: int | Cycles) -> bool | Flags:
        """Whether column ``h`` of a line (in cycles) lies inside the hsync pulse."""
        return (h >= self.h_sync_start) & (h < self.h_sync_stop)

    @overload
    def in_vsync(self, q: int) -> bool: ...
    @overload
    def in_vsync(self, q: Cycles) -> Flags: ...
    def in_vsync(self, q: int | Cycles) -> bool | Flags:
        """Whether position ``q`` (counted from reset) lies inside a vsync pulse.

        Pulses start at (line v_sync_start, column v_sync_at_h) of every frame and last
        ``vertical.sync`` lines; a pulse that would have begun before reset never shows.
        """
        if not self.interlaced:
            return (q >= self.vsync_first) & ((q - self.vsync_first) % self.frame_cycles < self.vsync_cycles)
        s0, s1 = self.vsync_starts()
        return ((q >= s0) & ((q - s0) % self.frame_cycles < self.vsync_cycles)) | (
            (q >= s1) & ((q - s1) % self.frame_cycles < self.vsync_cycles))


def timing(spec: Spec) -> Timing:
    """The timing model of a validated spec."""
    return Timing(spec)
