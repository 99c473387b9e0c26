"""The timing model's derived figures, each worked by hand on a small made-up raster.

The raster (made up for these tests, copied from nowhere):
horizontal 8 active, 2 front porch, 3 sync, 1 back porch = 14 cycles per line, negative sync;
vertical 4 active, 1 front porch, 2 sync, 0 back porch = 7 lines per frame, positive sync;
so a frame is 14 * 7 = 98 cycles.
"""

from __future__ import annotations

import numpy as np
import pytest

import synccore
from synccore.model import Timing
from tests import samples

H = (8, 2, 3, 1, "negative")
V = (4, 1, 2, 0, "positive")


def raster(**core: object) -> Timing:
    return synccore.timing(synccore.loads(samples.spec_text("hand", "1 MHz", H, V, core=core or None)))


def test_terminal_counts() -> None:
    # The counters run 0 .. total - 1: 14 cycles -> last 13; 7 lines -> last 6.
    t = raster()
    assert (t.h_last, t.v_last) == (13, 6)


def test_sync_bounds() -> None:
    # hsync from 8 + 2 = 10 to 10 + 3 = 13 (not wrapped); first cycle after it 13.
    # vsync from 4 + 1 = 5 to 5 + 2 = 7 = the total (no back porch): unwrapped 7, wrapped 0.
    t = raster()
    assert (t.h_sync_start, t.h_sync_stop, t.h_sync_end) == (10, 13, 13)
    assert (t.v_sync_start, t.v_sync_stop, t.v_sync_end) == (5, 7, 0)


def test_sync_span_in_pixels_and_lines() -> None:
    t = raster()
    assert t.sync_span("horizontal") == (10, 13)
    assert t.sync_span("vertical") == (5, 7)
    # Two pixels per clock: 16 4 6 2 pixels are 8 2 3 1 cycles; hsync spans pixels 20 .. 26.
    two = synccore.timing(synccore.loads(samples.spec_text(
        "hand2", "2 MHz", (16, 4, 6, 2, "negative"), V, core={"pixels_per_clock": 2})))  # fmt: skip
    assert (two.h_sync_start, two.h_sync_stop) == (10, 13)
    assert two.sync_span("horizontal") == (20, 26)
    with pytest.raises(ValueError, match=r"^axis must be 'horizontal' or 'vertical', got 'depth'$"):
        t.sync_span("depth")


def test_inactive_levels() -> None:
    # Negative hsync idles high; positive vsync idles low (common practice: polarity names
    # the level during the pulse).
    t = raster()
    assert (t.hsync_active_level, t.hsync_inactive_level) == (0, 1)
    assert (t.vsync_active_level, t.vsync_inactive_level) == (1, 0)


def test_position() -> None:
    # Position 31 = 2 * 14 + 3: column 3 of line 2; position 98 is the next frame's first.
    t = raster()
    assert t.position(31) == (3, 2)
    assert t.position(98) == (0, 0)
    cols, lines = t.position(np.array([0, 31, 98, 97]))
    assert cols.tolist() == [0, 3, 0, 13] and lines.tolist() == [0, 2, 0, 6]


def test_lead_shift() -> None:
    # lead 3: x/y of position 12 are those of 15 = column 1 of line 1; the counter starts at
    # (3, 0). lead 30 = 2 * 14 + 2: it starts at column 2 of line 2.
    t = raster(lead=3)
    assert t.lead == 3
    assert t.lead_position(12) == (1, 1)
    assert t.lead_reset == (3, 0)
    assert raster(lead=30).lead_reset == (2, 2)
    assert raster().lead_reset == (0, 0)


def test_in_hsync() -> None:
    # Columns 10, 11, 12 are in the pulse; 9 and 13 are not.
    t = raster()
    assert [h for h in range(t.h_total) if t.in_hsync(h)] == [10, 11, 12]
    assert t.in_hsync(np.arange(14)).tolist() == [10 <= h <= 12 for h in range(14)]


def test_in_vsync() -> None:
    # vsync starts at line 5, column 10 (the hsync leading edge): position 5 * 14 + 10 = 80,
    # and lasts 2 lines = 28 cycles: 80 .. 107. The pulse of the frame before reset would cover
    # positions 0 .. 107 - 98 = 9 but never shows.
    t = raster()
    assert (t.vsync_first, t.vsync_cycles) == (80, 28)
    assert [q for q in range(2 * 98) if t.in_vsync(q)] == [*range(80, 108), *range(178, 196)]
    assert t.in_vsync(np.arange(2 * 98)).tolist() == [t.in_vsync(q) for q in range(2 * 98)]


@pytest.mark.parametrize(("lead", "pixels", "exact_from", "judged_after"),
                         [(0, 0, 0, 1), (1, 0, 0, 1), (2, 1, 2, 3), (3, 2, 3, 4), (5, 4, 5, 6)])  # fmt: skip
def test_lead_figures(lead: int, pixels: int, exact_from: int, judged_after: int) -> None:
    # A pipeline of latency L shows what it was fed in reset (0, 0) on positions 0 .. L - 1;
    # position 0's own coordinates are (0, 0), so positions 1 .. L - 1 are wrong: L - 1 pixels,
    # exact from position L on (from 0 when none is wrong). A step into position n - 1 from
    # n - 2 is judged once n - 2 >= that position: after exact_from + 1 edges.
    t = raster(lead=lead)
    assert t.reset_xy_pixels == pixels
    assert t.exact_xy_from == exact_from
    assert t.xy_steps_judged_after == judged_after


@pytest.mark.parametrize("lead", [0, 1, 2, 3, 5, 8])
def test_reset_xy_pixels_through_a_pipeline(lead: int) -> None:
    """Feed x/y through a delay line of ``lead`` registers that held 0 in reset, as a user's
    pixel pipeline would, and count the first frame's pixels whose coordinates are not their own
    (lead <= 8 = the active width, so every one of the first positions has distinct x)."""
    t, plain = raster(lead=lead), raster()
    pipe = [(0, 0)] * lead  # what the registers hold coming out of reset
    wrong = []
    for q in range(t.frame_cycles):
        core = t.outputs_at(q - 1)  # what the core showed on the cycle before
        pipe = [(core.x, core.y), *pipe][:lead] if lead else []
        seen = pipe[-1] if lead else (t.outputs_at(q).x, t.outputs_at(q).y)
        own = plain.outputs_at(q)
        if own.de and seen != (own.x, own.y):
            wrong.append(q)
    assert wrong == list(range(1, lead))
    assert len(wrong) == t.reset_xy_pixels
    assert all(q < t.exact_xy_from for q in wrong)


@pytest.mark.parametrize(("lead", "stages", "delays"), [
    (0, 1, (1, 0)), (1, 1, (0, 0)), (3, 1, (0, 2)), (3, 4, (1, 0)), (0, 0, (0, 0)),
])  # fmt: skip
def test_alignment_delays(lead: int, stages: int, delays: tuple[int, int]) -> None:
    # The colour leaves a pipeline of S registers S cycles after x/y, which lead de by L:
    # S > L -> the syncs and de wait S - L; L > S -> the colour waits L - S.
    assert raster(lead=lead).alignment_delays(stages) == delays
