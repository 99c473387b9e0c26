"""The multi-mode model: which mode each frame is in, the sample point, reset, the boundary.

Figures of the example's modes are VESA DMT's: 640x480@60 (DMT ID 04h) 800 x 525 in all,
-hsync -vsync; 800x600@60 (DMT ID 09h) 1056 x 628, +hsync +vsync; 1024x768@60 (DMT ID 10h)
1344 x 806, -hsync -vsync.
"""

from __future__ import annotations

import pytest

import synccore
from synccore.model import MultiTiming, Timing
from synccore.verification.switching import judge_frames, measure_frames, segments, switching_sequence
from tests import samples as timings
from tests.conftest import ROOT

EXAMPLE = synccore.load(ROOT / "examples" / "field_logger_3modes.yaml")
VGA = 800 * 525  # cycles in a DMT 04h frame
SVGA = 1056 * 628  # DMT 09h


def test_widths_fit_the_largest_mode() -> None:
    mt = MultiTiming(EXAMPLE)
    assert mt.count == 3 and mt.mode_width == 2
    assert mt.h_width == 11  # 1343, DMT 10h's last column, needs 11 bits
    assert mt.v_width == 10  # 805
    assert mt.x_width == 10 and mt.y_width == 10  # 1023 and 767


def test_without_changes_every_frame_is_mode_0() -> None:
    frames = MultiTiming(EXAMPLE).frames([], 3 * VGA)
    assert [(f.first_edge, f.mode) for f in frames] == [(1, 0), (VGA + 1, 0), (2 * VGA + 1, 0)]


def test_the_input_is_read_on_the_last_edge_of_a_frame_only() -> None:
    mt = MultiTiming(EXAMPLE)
    # Read on the edge that shows frame 0's last position (edge VGA): takes effect on the next.
    assert [f.mode for f in mt.frames([(VGA, 1)], 2 * VGA)] == [0, 1]
    # One edge later is too late for that boundary: the next frame is still mode 0.
    frames = mt.frames([(VGA + 1, 1)], 2 * VGA + 1)
    assert [(f.first_edge, f.mode) for f in frames] == [(1, 0), (VGA + 1, 0), (2 * VGA + 1, 1)]
    # A value that comes and goes inside a frame has no effect.
    assert [f.mode for f in mt.frames([(10, 2), (VGA - 1, 0)], 2 * VGA)] == [0, 0]


def test_a_value_that_names_no_mode_is_ignored() -> None:
    mt = MultiTiming(EXAMPLE)
    frames = mt.frames([(5, 1), (VGA + 5, 3)], VGA + SVGA + 10)
    assert [f.mode for f in frames] == [0, 1, 1]


def test_the_first_frame_after_a_switch_is_whole_and_in_the_new_mode() -> None:
    mt = MultiTiming(EXAMPLE)
    frames = mt.frames([(5, 1)], VGA + SVGA + 1)
    svga = Timing(EXAMPLE.modes[1])
    assert frames[1].cycles == SVGA and frames[2].first_edge == VGA + SVGA + 1
    last_vga, _ = mt.output_at(frames, VGA)
    first_svga, mode = mt.output_at(frames, VGA + 1)
    assert mode == 1 and first_svga == svga.outputs_at(0)
    assert (last_vga.hsync, first_svga.hsync) == (1, 0)  # idle high (-hsync), then idle low (+hsync)
    assert (last_vga.vsync, first_svga.vsync) == (1, 0)
    assert first_svga.frame_start == 1 and first_svga.de == 1


def test_reset_is_mode_0() -> None:
    mt = MultiTiming(EXAMPLE)
    assert mt.reset_outputs() == Timing(EXAMPLE.modes[0]).reset_outputs()
    assert mt.output_at(mt.frames([(1, 2)], 1), 0) == (mt.reset_outputs(), 0)


def test_outputs_follow_each_frames_mode() -> None:
    mt = MultiTiming(synccore.loads(timings.MULTI_SMALL))
    changes, edges = switching_sequence(mt, seed=4, changes=20, unknown=True)
    samples = list(mt.outputs(changes, edges))
    assert len(samples) == edges
    frames = mt.frames(changes, edges)
    for f in frames:
        t = mt.modes[f.mode]
        for q in (0, t.h_sync_start, t.frame_cycles - 1):
            if f.first_edge + q <= edges:
                assert samples[f.first_edge + q - 1] == (t.outputs_at(q), f.mode)
    measured = measure_frames(segments(samples), mt)
    assert len(measured) == len(frames) - 1  # the last frame is cut by the end of the run
    assert not judge_frames(measured, mt, changes)


def test_the_frame_judge_names_a_torn_frame() -> None:
    """The model's own run with one frame cut short is judged as torn, with its line count."""
    mt = MultiTiming(synccore.loads(timings.MULTI_SMALL))
    samples = list(mt.outputs([], 3 * 320))  # mode 0: 32 x 10 cycles a frame (made up)
    cut = samples[:320 - 64] + samples[320:]  # the last two lines of frame 0 missing
    lines = judge_frames(measure_frames(segments(cut), mt), mt, [])
    assert "frame 0 (edge 1): a torn frame: line count 8, mode 0 expects 10" in lines


def test_a_single_mode_spec_has_no_multi_mode_model() -> None:
    with pytest.raises(ValueError, match="at least 2 modes, got 0"):
        MultiTiming(synccore.loads(timings.SMALL))
