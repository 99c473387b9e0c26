"""Stage 3: the timing model — every derived number, and the cycle-by-cycle reference.

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
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Spec


def bits_for(max_value: int) -> int:
    """Width of an unsigned register that holds ``0..max_value``; at least 1."""
    return max(1, int(max_value).bit_length())


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


@dataclass(frozen=True)
class Timing:
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
    def h_sync_start(self) -> int:
        return self.h_active + self.h_front

    @property
    def h_sync_end(self) -> int:
        """First cycle after the hsync pulse, wrapped into the line (0 when back porch is 0)."""
        return (self.h_sync_start + self.h_sync) % self.h_total

    @property
    def v_active(self) -> int:
        return self.spec.vertical.active

    @property
    def v_total(self) -> int:
        return self.spec.vertical.total

    @property
    def v_sync_start(self) -> int:
        return self.spec.vertical.active + self.spec.vertical.front_porch

    @property
    def v_sync_end(self) -> int:
        """First line after the vsync pulse, wrapped into the frame (0 when back porch is 0)."""
        return (self.v_sync_start + self.spec.vertical.sync) % self.v_total

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
        return self.h_total * self.v_total

    @property
    def hsync_active_level(self) -> int:
        return 1 if self.spec.horizontal.sync_polarity == "positive" else 0

    @property
    def vsync_active_level(self) -> int:
        return 1 if self.spec.vertical.sync_polarity == "positive" else 0

    # ------------------------------------------------------------------ widths
    @property
    def h_width(self) -> int:
        return bits_for(self.h_total - 1)

    @property
    def v_width(self) -> int:
        return bits_for(self.v_total - 1)

    @property
    def scale_shift(self) -> int:
        """x and y are divided by core.scale: a right shift by this many bits."""
        return self.spec.core.scale.bit_length() - 1

    @property
    def x_width(self) -> int:
        return bits_for((self.spec.horizontal.active - 1) >> self.scale_shift)

    @property
    def y_width(self) -> int:
        return bits_for((self.v_active - 1) >> self.scale_shift)

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

    @property
    def lead_reset(self) -> tuple[int, int]:
        """(column, line) in cycles of the position ``lead`` cycles after the first active pixel."""
        lead = self.spec.core.lead
        return lead % self.h_total, (lead // self.h_total) % self.v_total

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
        return self.line_rate_hz / self.v_total

    @property
    def blanking_share(self) -> Fraction:
        """Share of the frame's pixel periods that are not visible."""
        h, v = self.spec.horizontal, self.spec.vertical
        return 1 - Fraction(h.active * v.active, h.total * v.total)

    # --------------------------------------------------------------- reference
    def outputs_at(self, q: int) -> Outputs:
        """Outputs after the ``q+1``-th advancing edge since reset, i.e. showing position ``q``.

        ``q = -1`` gives the reset values.
        """
        if q < 0:
            return self.reset_outputs()
        h = q % self.h_total
        v = (q // self.h_total) % self.v_total
        h_on = self.h_sync_start <= h < self.h_sync_start + self.h_sync
        # vsync pulses start at (v_sync_start, v_sync_at_h) of every frame and last
        # `sync` lines; a pulse that would have begun before reset never shows.
        first_start, pulse = self.vsync_first, self.vsync_cycles
        if q < first_start:
            v_on = False
        else:
            v_on = (q - first_start) % self.frame_cycles < pulse
        hl, vl = self._position(q + self.spec.core.lead)
        active_h, active_v = h < self.h_active, v < self.v_active
        return Outputs(
            hsync=self.hsync_active_level if h_on else 1 - self.hsync_active_level,
            vsync=self.vsync_active_level if v_on else 1 - self.vsync_active_level,
            de=int(active_h and active_v),
            hblank=int(not active_h),
            vblank=int(not active_v),
            x=((hl * self.ppc) >> self.scale_shift) if hl < self.h_active else 0,
            y=(vl >> self.scale_shift) if vl < self.v_active else 0,
            line_start=int(h == 0 and active_v),
            frame_start=int(h == 0 and v == 0),
        )

    def reset_outputs(self) -> Outputs:
        """What every output holds during reset."""
        return Outputs(
            hsync=1 - self.hsync_active_level,
            vsync=1 - self.vsync_active_level,
            de=0,
            hblank=1,
            vblank=1,
            x=0,
            y=0,
            line_start=0,
            frame_start=0,
        )

    def _position(self, q: int) -> tuple[int, int]:
        return q % self.h_total, (q // self.h_total) % self.v_total


def timing(spec: Spec) -> Timing:
    """The timing model of a validated spec."""
    return Timing(spec)
