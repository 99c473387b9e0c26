"""The timing model: derived rates against published figures, and the reference's invariants."""

from __future__ import annotations

from dataclasses import replace
from fractions import Fraction

import pytest

import synccore
from synccore.units import fixed, hz, in_unit
from tests import samples as timings


def t_of(text: str) -> synccore.Timing:
    return synccore.timing(synccore.loads(text))


@pytest.mark.parametrize(
    ("text", "line_khz", "refresh_hz"),
    [
        # VESA DMT 640x480 at 60 Hz (DMT ID 04h): 31.469 kHz line rate, 59.940 Hz field rate.
        (timings.DMT_640x480, "31.469", "59.940"),
        # VESA DMT 800x600 at 60 Hz (DMT ID 09h): 37.879 kHz, 60.317 Hz.
        (timings.DMT_800x600, "37.879", "60.317"),
        # CTA-861 VIC 4, 1280x720p: 74.25 MHz over 1650 x 750 (Linux kernel edid_cea_modes_1[])
        # gives 45.000 kHz, 60.000 Hz.
        (timings.CTA_720P, "45.000", "60.000"),
        # CTA-861 VIC 16, 1920x1080p: 148.5 MHz over 2200 x 1125 (Linux kernel
        # edid_cea_modes_1[]) gives 67.500 kHz, 60.000 Hz.
        (timings.CTA_1080P, "67.500", "60.000"),
    ],
)
def test_rates_match_published_figures(text: str, line_khz: str, refresh_hz: str) -> None:
    t = t_of(text)
    assert in_unit(t.line_rate_hz, "kHz") == line_khz
    assert fixed(t.refresh_hz, 3) == refresh_hz


def test_dmt_640x480_totals() -> None:
    # VESA DMT ID 04h: 800 pixels per line, 525 lines per frame.
    t = t_of(timings.DMT_640x480)
    assert (t.spec.horizontal.total, t.spec.vertical.total) == (800, 525)
    assert hz(t.pixel_clock_hz) == "25.175 MHz"
    # Common practice: blanking share of 640x480@60 is about 26.9 % of the pixel periods.
    assert fixed(t.blanking_share * 100, 1) == "26.9"


def test_interlaced_blanking_share_counts_both_fields() -> None:
    # CTA-861 VIC 6/7, 480i (from memory): 720 x 480 picture pixels of 858 x 525 per frame,
    # each pixel sent twice; 1 - 345600/450450 = 23.28 %, the same in pixel clocks.
    t = synccore.timing(synccore.loads("name: tv\nstandard: '720x480i@59.94'\n"))
    assert t.blanking_share == 1 - Fraction(720 * 480, 858 * 525)
    assert fixed(t.blanking_share * 100, 1) == "23.3"


def test_widths() -> None:
    t = t_of(timings.DMT_640x480)
    assert (t.h_width, t.v_width, t.x_width, t.y_width) == (10, 10, 10, 9)
    tiny = t_of(timings.TINY)
    assert (tiny.h_width, tiny.v_width, tiny.x_width, tiny.y_width) == (2, 2, 1, 1)
    huge = t_of(timings.HUGE)
    assert huge.h_total == 1100 and huge.x_width == 13 and huge.x_shift == 3


def frame(t: synccore.Timing, start: int = 0) -> list[synccore.Outputs]:
    return [t.outputs_at(q) for q in range(start, start + t.frame_cycles)]


@pytest.mark.parametrize(
    "text", [timings.SMALL, timings.TINY, timings.NO_BACK_PORCH, timings.SMALL_ALL_OPTIONS]
)
def test_reference_invariants(text: str) -> None:
    t = t_of(text)
    h, v = t.spec.horizontal, t.spec.vertical
    outs = frame(t, start=t.frame_cycles)  # a frame after the first, so no reset effects
    assert sum(o.de for o in outs) == t.h_active * v.active
    assert all(o.de == (1 - (o.hblank | o.vblank)) for o in outs)
    assert sum(o.frame_start for o in outs) == 1 and outs[0].frame_start == 1
    assert sum(o.line_start for o in outs) == v.active
    hs_on = sum(o.hsync == t.hsync_active_level for o in outs)
    vs_on = sum(o.vsync == t.vsync_active_level for o in outs)
    assert hs_on == t.h_sync * v.total
    assert vs_on == v.sync * t.h_total
    assert max(o.x for o in outs) == h.active - t.ppc
    assert max(o.y for o in outs) == v.active - 1


def test_first_cycle_after_reset_is_first_active_pixel() -> None:
    t = t_of(timings.SMALL)
    first = t.outputs_at(0)
    assert (first.de, first.frame_start, first.line_start, first.x, first.y) == (1, 1, 1, 0, 0)
    reset = t.outputs_at(-1)
    assert reset.de == 0 and reset.hsync != t.hsync_active_level
    assert reset.vsync != t.vsync_active_level


def test_vsync_at_hsync_leading_edge() -> None:
    # CTA-861 progressive formats: the vsync leading edge coincides with the hsync leading edge
    # (from memory: CTA-861, video timing section).
    t = t_of(timings.CTA_720P)
    q = t.v_sync_start * t.h_total + t.h_sync_start
    before, at = t.outputs_at(q - 1), t.outputs_at(q)
    assert (before.vsync, at.vsync) == (0, 1)
    assert (before.hsync, at.hsync) == (0, 1)


def test_vsync_at_line_start_option() -> None:
    t = t_of(timings.SMALL_ALL_OPTIONS)
    q = t.v_sync_start * t.h_total
    assert t.outputs_at(q - 1).vsync == 1 and t.outputs_at(q).vsync == 0


def test_no_back_porch_pulse_wraps_and_is_never_cut_after_reset() -> None:
    t = t_of(timings.NO_BACK_PORCH)
    outs = frame(t)
    # The vsync pulse of the previous frame would run into line 0: after reset it does not show.
    assert outs[0].vsync == 1 - t.vsync_active_level
    later = frame(t, start=t.frame_cycles)
    assert later[0].vsync == t.vsync_active_level


def test_lead_moves_only_coordinates() -> None:
    base = t_of(timings.SMALL)
    led = t_of(timings.SMALL.replace("name: small_mode", "name: small_mode\ncore: {lead: 3}"))
    for q in range(base.frame_cycles * 2):
        a, b = base.outputs_at(q), led.outputs_at(q)
        assert (a.hsync, a.vsync, a.de, a.line_start, a.frame_start) == (
            b.hsync, b.vsync, b.de, b.line_start, b.frame_start)  # fmt: skip
        c = base.outputs_at(q + 3)
        assert (b.x, b.y) == (c.x, c.y)


def test_fraction_clock_exact() -> None:
    t = t_of(timings.DMT_640x480)
    assert t.refresh_hz == Fraction(25_175_000, 800 * 525)


@pytest.mark.parametrize(("text", "ppc", "scale"), [(timings.SCALED, 1, 2), (timings.SCALED_PPC, 2, 4)])
def test_scale_divides_coordinates(text: str, ppc: int, scale: int) -> None:
    t = t_of(text)
    plain = synccore.timing(replace(t.spec, core=replace(t.spec.core, scale=1)))
    for q in range(t.frame_cycles):
        a, b = t.outputs_at(q), plain.outputs_at(q)
        assert (a.x, a.y) == (b.x // scale, b.y // scale)
        assert (a.hsync, a.vsync, a.de) == (b.hsync, b.vsync, b.de)
    h, v = t.spec.horizontal.active, t.spec.vertical.active
    assert (t.x_width, t.y_width) == ((h // scale - 1).bit_length(), (v // scale - 1).bit_length())
    assert t.x_step == ppc // scale
