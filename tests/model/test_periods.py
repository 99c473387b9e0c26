"""Periods a user checks first, from the model's rates.

Check values (common practice, the arithmetic of the trade): at 25 MHz a pixel lasts
0.04 µs, an 800-pixel line 32 µs, and 521 such lines 16.67 ms, one 60 Hz frame.
"""

from __future__ import annotations

from fractions import Fraction

import synccore

SPEC = """\
name: periods
pixel_clock_hz: 25 MHz
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 29, sync_polarity: negative}
"""


def test_pixel_line_and_frame_periods() -> None:
    t = synccore.timing(synccore.loads(SPEC))
    assert t.spec.horizontal.total == 800 and t.v_total == 521
    assert 1 / t.pixel_clock_hz == Fraction(4, 100) / 10**6  # 0.04 µs per pixel
    assert 1 / t.line_rate_hz == Fraction(32, 10**6)  # 32 µs per line
    frame_s = 1 / t.refresh_hz
    assert round(frame_s * 1000, 2) == Fraction(1667, 100)  # 16.67 ms per frame
    assert round(float(t.refresh_hz)) == 60  # one 60 Hz frame (59.98 Hz)
