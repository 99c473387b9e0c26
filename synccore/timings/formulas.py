"""Timing formulas: VESA CVT 1.2 (standard blanking, reduced blanking v1 and v2) and VESA GTF.

Each formula turns a width, a height and a refresh rate into explicit porches,
syncs and a pixel clock.  Arithmetic is exact (fractions), with the rounding
steps the standards prescribe (ROUNDDOWN / ROUND to a cell or a clock step), so
results do not depend on floating point.

Margins and the formulas' interlaced variants are not supported: the formulas give
progressive timings with no border (interlaced formats come from the CTA-861 library).
When the width is not a multiple of the formula's character
cell, the formula runs on the rounded width and the requested width is kept by
moving the difference into the front porch (the line total and the clock stay
as the formula computed them); the result says so in its notes.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Axis

METHODS = ("cvt", "cvt-rb", "cvt-rb2", "gtf")

# ----------------------------------------------------------- CVT constants
CELL_GRAN = 8  # pixels per character cell (CVT standard blanking, CVT-RB, GTF)
CVT_MIN_VSYNC_BP_US = Fraction(550)  # minimum vsync + back porch time
CVT_MIN_V_PORCH = 3  # lines of vertical front porch
CVT_MIN_V_BPORCH = 6  # minimum lines of vertical back porch
CVT_H_SYNC_PERCENT = Fraction(8)
CVT_CLOCK_STEP_HZ = 250_000  # 0.25 MHz
# Blanking formula gradient and offset, with the scaling factors K and J applied:
# C' = (C - J) * K / 256 + J and M' = K / 256 * M for C=40, M=600, K=128, J=20.
C_PRIME = Fraction(30)
M_PRIME = Fraction(300)
RB_MIN_V_BLANK_US = Fraction(460)
RB1_H_BLANK, RB1_H_SYNC, RB1_H_BACK = 160, 32, 80
RB1_V_FPORCH = 3
RB2_H_BLANK, RB2_H_SYNC, RB2_H_BACK = 80, 32, 40
RB2_V_SYNC = 8
RB2_V_FPORCH_MIN = 1
RB2_CLOCK_STEP_HZ = 1_000  # 0.001 MHz
# GTF default parameters (same C', M') and its vertical figures.
GTF_MIN_PORCH = 1
GTF_V_SYNC = 3
GTF_MIN_VSYNC_BP_US = Fraction(550)

# Vertical sync width by aspect ratio (CVT); any other ratio uses 10 lines.
_ASPECT_VSYNC = ((4, 3, 4), (16, 9, 5), (16, 10, 6), (5, 4, 7), (15, 9, 7))
CUSTOM_ASPECT_VSYNC = 10


@dataclass(frozen=True)
class FormulaResult:
    """Explicit timing from a formula, with notes on every adjustment made."""

    method: str
    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis
    notes: tuple[str, ...] = ()

    @property
    def refresh_hz(self) -> Fraction:
        return self.pixel_clock_hz / (self.horizontal.total * self.vertical.total)


class FormulaError(ValueError):
    """Inputs the formula cannot turn into a timing."""


def _floor(x: Fraction) -> int:
    return math.floor(x)


def _round(x: Fraction) -> int:
    """Round half up, as a spreadsheet's ROUND does for positive numbers."""
    return math.floor(x + Fraction(1, 2))


def cvt_vsync_lines(width: int, height: int) -> int:
    """CVT's vertical sync width: it encodes the aspect ratio (4:3 → 4 … other → 10)."""
    for a, b, lines in _ASPECT_VSYNC:
        if width == CELL_GRAN * _round(Fraction(height * a, b * CELL_GRAN)):
            return lines
    return CUSTOM_ASPECT_VSYNC


def _cell_width(width: int, rounded: int, method: str, notes: list[str]) -> None:
    if rounded != width:
        diff = width - rounded
        how = (f"the {diff} extra active pixels were taken from the front porch" if diff > 0
               else f"the {-diff} missing active pixels were added to the front porch")  # fmt: skip
        notes.append(
            f"width {width} is not a multiple of the {CELL_GRAN}-pixel character cell: "
            f"{method.upper()} computed the timing for {rounded} pixels and {how} "
            "(line total and pixel clock unchanged)"
        )


def _sane(method: str, width: int, height: int, rate: Fraction, h: Axis, v: Axis,
          clock: Fraction) -> None:  # fmt: skip
    """Refuse what the formula yields for inputs far outside its design range."""
    if min(h.front_porch, h.back_porch, v.front_porch, v.back_porch) < 0 or \
            min(h.sync, v.sync) < 1 or clock <= 0:  # fmt: skip
        raise FormulaError(f"{method.upper()} yields no usable timing for {width}x{height} at "
                           f"{float(rate):g} Hz (a sync or porch comes out empty)")  # fmt: skip


def _check(width: int, height: int, refresh: Fraction) -> None:
    if width < CELL_GRAN * 2 or height < 2:
        raise FormulaError(f"size {width}x{height} is too small for a timing formula")
    if refresh <= 0:
        raise FormulaError(f"refresh must be above 0, got {refresh}")


def cvt(width: int, height: int, refresh: Fraction | int, *,
        reduced: int = 0, video_optimized: bool = False) -> FormulaResult:  # fmt: skip
    """VESA CVT 1.2: ``reduced`` 0 (standard blanking, CRT), 1 (RB v1) or 2 (RB v2).

    ``video_optimized`` (RB v2 only) lowers the clock by 1000/1001, for 59.94 Hz etc.
    The steps common to both blanking kinds are here; the standard's two computations
    follow in :func:`_cvt_standard_blanking` and :func:`_cvt_reduced_blanking`.
    """
    rate = Fraction(refresh)
    _check(width, height, rate)
    if video_optimized and reduced != 2:
        raise FormulaError("video_optimized applies to cvt-rb2 only")
    method = ("cvt", "cvt-rb", "cvt-rb2")[reduced]
    notes: list[str] = []
    frame_us = Fraction(1_000_000) / rate
    if reduced == 2:
        h_rnd = width  # RB v2 has a one-pixel cell
        v_sync = RB2_V_SYNC
    else:
        h_rnd = (width // CELL_GRAN) * CELL_GRAN
        _cell_width(width, h_rnd, method, notes)
        v_sync = cvt_vsync_lines(width, height)
        if v_sync == CUSTOM_ASPECT_VSYNC:
            notes.append(f"{width}x{height} is none of CVT's aspect ratios (4:3, 16:9, 16:10, "
                         f"5:4, 15:9): vertical sync is {CUSTOM_ASPECT_VSYNC} lines")  # fmt: skip
    if reduced == 0:
        clock, h, v = _cvt_standard_blanking(h_rnd, height, rate, frame_us, v_sync)
    else:
        clock, h, v = _cvt_reduced_blanking(h_rnd, height, rate, frame_us, v_sync,
                                            reduced=reduced, video_optimized=video_optimized,
                                            notes=notes)  # fmt: skip
    # Keep the requested width: the cell rounding moves into the front porch.
    h = Axis(width, h.front_porch - (width - h_rnd), h.sync, h.back_porch, h.sync_polarity)
    _sane(method, width, height, rate, h, v, Fraction(clock))
    return FormulaResult(method, Fraction(clock), h, v, tuple(notes))


def _cvt_standard_blanking(h_rnd: int, height: int, rate: Fraction, frame_us: Fraction,
                           v_sync: int) -> tuple[int, Axis, Axis]:  # fmt: skip
    """CVT standard (CRT) blanking: the pixel clock and both axes, on the cell-rounded width."""
    h_period = (frame_us - CVT_MIN_VSYNC_BP_US) / (height + CVT_MIN_V_PORCH)
    if h_period <= 0:
        raise FormulaError(f"refresh {float(rate):g} Hz is too high for CVT")
    v_sync_bp = _floor(CVT_MIN_VSYNC_BP_US / h_period) + 1
    v_sync_bp = max(v_sync_bp, v_sync + CVT_MIN_V_BPORCH)
    duty = C_PRIME - M_PRIME * h_period / 1000
    if duty < 20:
        duty = Fraction(20)
    h_blank = _floor(h_rnd * duty / (100 - duty) / (2 * CELL_GRAN)) * 2 * CELL_GRAN
    h_total = h_rnd + h_blank
    clock = CVT_CLOCK_STEP_HZ * _floor(h_total / h_period * 1_000_000 / CVT_CLOCK_STEP_HZ)
    h_sync = _floor(CVT_H_SYNC_PERCENT / 100 * h_total / CELL_GRAN) * CELL_GRAN
    h_back = h_blank // 2
    h_front = h_blank - h_sync - h_back
    h = Axis(h_rnd, h_front, h_sync, h_back, "negative")
    v = Axis(height, CVT_MIN_V_PORCH, v_sync, v_sync_bp - v_sync, "positive")
    return clock, h, v


def _cvt_reduced_blanking(h_rnd: int, height: int, rate: Fraction, frame_us: Fraction,
                          v_sync: int, *, reduced: int, video_optimized: bool,
                          notes: list[str]) -> tuple[int, Axis, Axis]:  # fmt: skip
    """CVT reduced blanking, v1 or v2: the pixel clock and both axes, on the rounded width."""
    h_period = (frame_us - RB_MIN_V_BLANK_US) / height
    if h_period <= 0:
        raise FormulaError(f"refresh {float(rate):g} Hz is too high for CVT")
    vbi = _floor(RB_MIN_V_BLANK_US / h_period) + 1
    if reduced == 1:
        vbi = max(vbi, RB1_V_FPORCH + v_sync + CVT_MIN_V_BPORCH)
        h_blank, h_sync, h_back = RB1_H_BLANK, RB1_H_SYNC, RB1_H_BACK
        step = CVT_CLOCK_STEP_HZ
        v = Axis(height, RB1_V_FPORCH, v_sync, vbi - RB1_V_FPORCH - v_sync, "negative")
    else:
        vbi = max(vbi, RB2_V_FPORCH_MIN + v_sync + CVT_MIN_V_BPORCH)
        h_blank, h_sync, h_back = RB2_H_BLANK, RB2_H_SYNC, RB2_H_BACK
        step = RB2_CLOCK_STEP_HZ
        v = Axis(height, vbi - v_sync - CVT_MIN_V_BPORCH, v_sync, CVT_MIN_V_BPORCH,
                 "negative")  # fmt: skip
    h_total = h_rnd + h_blank
    h_front = h_blank - h_sync - h_back
    v_total = height + vbi
    ideal = rate * v_total * h_total
    if video_optimized:
        ideal = ideal * 1000 / 1001
        notes.append("video-optimized: pixel clock lowered by 1000/1001")
    clock = step * _floor(ideal / step)
    return clock, Axis(h_rnd, h_front, h_sync, h_back, "positive"), v


def gtf(width: int, height: int, refresh: Fraction | int) -> FormulaResult:
    """VESA GTF 1.1 with the default parameters (C=40, M=600, K=128, J=20), refresh-driven."""
    rate = Fraction(refresh)
    _check(width, height, rate)
    notes: list[str] = []
    h_rnd = _round(Fraction(width, CELL_GRAN)) * CELL_GRAN
    _cell_width(width, h_rnd, "gtf", notes)
    frame_us = Fraction(1_000_000) / rate
    h_period_est = (frame_us - GTF_MIN_VSYNC_BP_US) / (height + GTF_MIN_PORCH)
    if h_period_est <= 0:
        raise FormulaError(f"refresh {float(rate):g} Hz is too high for GTF")
    v_sync_bp = _round(GTF_MIN_VSYNC_BP_US / h_period_est)
    v_total = height + v_sync_bp + GTF_MIN_PORCH
    v_rate_est = Fraction(1_000_000) / h_period_est / v_total
    h_period = h_period_est / (rate / v_rate_est)
    duty = C_PRIME - M_PRIME * h_period / 1000
    h_blank = _round(h_rnd * duty / (100 - duty) / (2 * CELL_GRAN)) * 2 * CELL_GRAN
    h_total = h_rnd + h_blank
    clock = Fraction(h_total) / h_period * 1_000_000
    h_sync = _round(CVT_H_SYNC_PERCENT / 100 * h_total / CELL_GRAN) * CELL_GRAN
    h_back = h_blank // 2
    h_front = h_blank // 2 - h_sync - (width - h_rnd)
    notes.append("GTF does not round the pixel clock; a board's PLL will land near it")
    h = Axis(width, h_front, h_sync, h_back, "negative")
    v = Axis(height, GTF_MIN_PORCH, GTF_V_SYNC, v_sync_bp - GTF_V_SYNC, "positive")
    _sane("gtf", width, height, rate, h, v, clock)
    return FormulaResult("gtf", clock, h, v, tuple(notes))


def compute(method: str, width: int, height: int, refresh: Fraction | int, *,
            video_optimized: bool = False) -> FormulaResult:  # fmt: skip
    """Run the named method (one of :data:`METHODS`)."""
    if method == "gtf":
        if video_optimized:
            raise FormulaError("video_optimized applies to cvt-rb2 only")
        return gtf(width, height, refresh)
    if method not in METHODS:
        raise FormulaError(f"method must be one of {', '.join(METHODS)}, got {method!r}")
    return cvt(width, height, refresh, reduced=METHODS.index(method),
               video_optimized=video_optimized)  # fmt: skip
