"""The simulated monitor: mode naming for every library entry, faults a monitor would show.

The library entries' own figures (VESA DMT, CTA-861, as stored in synccore's
mode table) give the sync edges; the detector must name each entry back.  The
faulty cores are the DMT 640x480@60 timing (DMT ID 04h: 640 16 96 48 /
480 10 2 33, negative/negative, 25.175 MHz; VESA DMT as reproduced in the Linux
kernel's drm_dmt_modes[], drivers/gpu/drm/drm_edid.c) with one
porch pixel moved, or a polarity flipped.
"""

from __future__ import annotations

from dataclasses import replace
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

import synccore
from synccore.model import Timing
from synccore.picture.monitor import Pulses, parse_range, read_syncs, watch
from synccore.picture.run import model_pins
from synccore.spec import Axis, Color, Spec
from synccore.timings.modes import Mode, library
from tests.picture.test_pattern_sim import expected_image

VGA = Spec(
    name="vga",
    pixel_clock_hz=Fraction(25_175_000),
    horizontal=Axis(640, 16, 96, 48, "negative"),
    vertical=Axis(480, 10, 2, 33, "negative"),
    color=Color(4, 4, 4),
)


def _features(m: Mode) -> tuple[object, ...]:
    return (m.horizontal.total, m.vertical.total, m.horizontal.sync, m.vertical.sync,
            m.horizontal.sync_polarity, m.vertical.sync_polarity)  # fmt: skip


def synthetic_pulses(m: Mode, frames: int = 2) -> tuple[float, Pulses, Pulses]:
    """Sync leading edges and widths of a core running ``m``, from its timing numbers alone."""
    h, v = m.horizontal, m.vertical
    h_total, v_total = h.total, v.total
    lines = v_total * frames + v.active + v.front_porch + 2
    h_start = h.active + h.front_porch
    h_lead = h_start + h_total * np.arange(lines, dtype=np.int64)
    v_first = (v.active + v.front_porch) * h_total + h_start
    v_lead = v_first + h_total * v_total * np.arange(frames, dtype=np.int64)
    hp = Pulses(1 if h.sync_polarity == "positive" else 0, h_lead, np.full(lines, h.sync))
    vp = Pulses(1 if v.sync_polarity == "positive" else 0, v_lead, np.full(frames, v.sync * h_total))
    return float(1 / m.pixel_clock_hz), hp, vp


@pytest.mark.parametrize("mode", library(), ids=[f"{m.name}-{m.source}" for m in library()])
def test_every_library_mode_is_named_back(mode: Mode) -> None:
    period, hp, vp = synthetic_pulses(mode)
    mon = read_syncs(period, hp, vp)
    assert mon.mode is not None, mon.nearest_why
    assert mon.problems == []
    # Entries a monitor cannot tell apart (same totals, widths, polarities, rates within 1 %)
    # are accepted; the named one must have this entry's sync figures.
    assert mon.mode == mode or (_features(mon.mode) == _features(mode)
                                and abs(float(mon.mode.refresh_hz / mode.refresh_hz) - 1) < 0.01)
    assert mon.lines_per_frame == mode.vertical.total
    assert mon.hsync_polarity == mode.horizontal.sync_polarity
    assert mon.vsync_polarity == mode.vertical.sync_polarity


def test_model_pins_of_vga_named_and_pictured() -> None:
    pins = model_pins(VGA, "edges", (490 + 525 + 3) * 800)
    mon = watch(pins)
    assert mon.mode is not None and mon.mode.name in ("640x480@60", "640x480@59.94")
    assert mon.problems == []
    assert mon.image is not None
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("edges", 640, 480)))


FRAME = (490 + 525 + 3) * 800  # enough cycles of DMT 640x480 for two vsyncs and a frame


def test_porches_the_spec_chose_are_a_note_not_a_failure() -> None:
    """Back porch one short (front porch one longer): rates and syncs are DMT 640x480's."""
    bad = replace(VGA, horizontal=Axis(640, 17, 96, 47, "negative"))
    mon = watch(model_pins(bad, "edges", FRAME), spec=bad)
    assert mon.mode is not None  # rates and syncs still match: the monitor locks
    assert mon.problems == []
    assert mon.offset == (-1, 0)
    assert mon.notes == [
        "the picture starts 1 pixel earlier than 640x480@60 puts it (at 143 clocks after the hsync "
        "leading edge and 35 lines after the vsync line; the mode's sync + back porch is 144 and 35): "
        "an analog (VGA) monitor recentres it within its adjustment range, moving it 1 pixel right; a "
        "digital input (DVI, a panel) places it by de and shows it as sent"
    ]
    assert mon.placed_by.startswith("de, as a digital input does")
    assert mon.image is not None  # the picture as drawn, where de puts it
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("edges", 640, 480)))


def test_without_a_spec_the_place_is_a_note_that_says_so() -> None:
    bad = replace(VGA, horizontal=Axis(640, 17, 96, 47, "negative"))
    mon = watch(model_pins(bad, "edges", FRAME))
    assert mon.problems == []
    assert len(mon.notes) == 1
    assert mon.notes[0].endswith("; no spec was given to say whether these porches are meant")


def test_a_design_that_delays_de_against_its_spec_fails() -> None:
    """A pipeline stage on de and colour but not on the syncs: one clock late against the spec."""
    pins = model_pins(VGA, "edges", FRAME)

    def late(a: np.ndarray) -> np.ndarray:
        return np.concatenate([[0], a[:-1]])

    bad = replace(pins, de=late(pins.de), red=late(pins.red), green=late(pins.green), blue=late(pins.blue))
    mon = watch(bad, spec=VGA)
    assert mon.problems == [
        "the design does not send its spec's timing: de starts 145 clocks after the hsync leading edge, "
        "the spec's sync + back porch is 144 (picture shifted by 1 pixel)"
    ]
    # DMT 640x480: sync 96 + back porch 48 = 144 (VESA DMT ID 04h, module docstring).
    assert mon.offset == (1, 0)


def test_adjusted_porches_of_800x600_at_40_5_mhz() -> None:
    """Issue 10's case: 1069 clocks per line at 40.5 MHz, back porch 88 + 7.

    DMT 800x600@60 (from memory: VESA DMT ID 09h): 40 MHz, 800 40 128 88 / 600 1 4 23,
    positive/positive; 1056 clocks per line, 628 lines.
    """
    spec = Spec(name="svga", pixel_clock_hz=Fraction(40_500_000),
                horizontal=Axis(800, 46, 128, 95, "positive"), vertical=Axis(600, 1, 4, 23, "positive"),
                color=Color(4, 4, 4))  # fmt: skip
    t = Timing(spec)
    mon = watch(model_pins(spec, "bars", (t.v_sync_start + t.v_total + 3) * t.h_total), spec=spec)
    assert mon.mode is not None and mon.mode.name == "800x600@60"
    assert mon.problems == []
    assert mon.notes == [
        "a line has 1069 clocks where 800x600@60 has 1056: a digital input follows the pixel clock; an "
        "analog monitor must set its sampling clock to 1069 per line (its auto-adjust does) or it "
        "resamples the picture",
        "the picture starts 7 pixels later than 800x600@60 puts it (at 223 clocks after the hsync leading "
        "edge and 27 lines after the vsync line; the mode's sync + back porch is 216 and 27): an analog "
        "(VGA) monitor recentres it within its adjustment range, moving it 7 pixels left; a digital "
        "input (DVI, a panel) places it by de and shows it as sent",
    ]
    assert mon.image is not None
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("bars", 800, 600)))


def test_wrong_polarity_is_caught() -> None:
    bad = replace(VGA, horizontal=Axis(640, 16, 96, 48, "positive"))
    mon = watch(model_pins(bad, "bars", (490 + 525 + 3) * 800))
    assert mon.mode is None
    assert mon.nearest is not None and mon.nearest.name.startswith("640x480")
    assert "hsync negative" in mon.nearest_why
    assert mon.hsync_polarity == "positive"
    assert mon.image is not None and mon.placed_by.startswith("de")
    assert mon.problems == [
        "the rates are those of 640x480@60 (DMT 04h) but the syncs are not: it has hsync negative; a "
        "monitor may refuse the mode or take it for another"
    ]


def test_monitor_range() -> None:
    assert parse_range("30-83kHz,56-76Hz") == ((30e3, 83e3), (56.0, 76.0))
    with pytest.raises(ValueError, match=r"must look like 30-83kHz, got 'fast'"):
        parse_range("fast,56-76Hz")
    mon = watch(model_pins(VGA, "bars", (490 + 525 + 3) * 800), monitor_range=parse_range("32-83kHz,56-76Hz"))
    assert mon.problems == ["line rate 31.469 kHz is outside the monitor's 32-83 kHz"]


def test_line_jitter_is_caught() -> None:
    pins = model_pins(VGA, "bars", (490 + 525 + 3) * 800)
    at = 300 * 800 + 700  # one extra blank cycle in a line's back porch

    def stretch(a: np.ndarray) -> np.ndarray:
        return np.insert(a, at, a[at])

    bad = replace(pins, hsync=stretch(pins.hsync), vsync=stretch(pins.vsync), de=stretch(pins.de),
                  red=stretch(pins.red), green=stretch(pins.green), blue=stretch(pins.blue))  # fmt: skip
    mon = watch(bad)
    assert any(p.startswith("jitter: line period varies from 800 to 801") for p in mon.problems)


def test_de_only_picture_for_a_custom_timing() -> None:
    spec = synccore.loads(
        "name: tiny\npixel_clock_hz: 1 MHz\n"
        "horizontal: {active: 64, front_porch: 3, sync: 5, back_porch: 7, sync_polarity: positive}\n"
        "vertical: {active: 40, front_porch: 2, sync: 2, back_porch: 3, sync_polarity: positive}\n"
        "color: {red: 5, green: 6, blue: 5}\n"
    )  # made-up timing for the test
    t = Timing(spec)
    mon = watch(model_pins(spec, "grid", (t.v_sync_start + t.v_total + 3) * t.h_total))
    assert mon.mode is None and mon.problems == []
    assert mon.image is not None and mon.image.size == (64, 40)
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("grid", 64, 40)))
    assert isinstance(mon.image, Image.Image)


def test_view_cli_builtin(tmp_path: Path) -> None:
    from click.testing import CliRunner

    from synccore.cli.main import main

    spec = tmp_path / "vga.yaml"
    spec.write_text('name: vga\nstandard: "DMT 0x04"\ncolor: {red: 3, green: 3, blue: 2}\n')
    out = tmp_path / "v.png"
    result = CliRunner().invoke(main, ["view", str(spec), "--sim", "model", "--pattern", "edges",
                                       "-o", str(out)])  # fmt: skip
    assert result.exit_code == 0, result.output
    assert "640x480@60 (DMT 04h" in result.output
    assert np.array_equal(np.asarray(Image.open(out).convert("RGB")),
                          np.asarray(expected_image("edges", 640, 480)))  # fmt: skip
    result = CliRunner().invoke(main, ["view", str(spec), "--sim", "model",
                                       "--monitor-range", "40-83kHz,56-76Hz", "-o", str(out)])  # fmt: skip
    assert result.exit_code == 1
    assert "PROBLEM line rate 31.469 kHz is outside the monitor's 40-83 kHz" in result.output


def test_frame_to_frame_de_jitter_is_caught() -> None:
    """Syncs steady, but the picture of the second full frame starts one clock late."""
    t = Timing(VGA)
    cycles = (490 + 2 * 525 + 3) * 800
    pins = model_pins(VGA, "bars", cycles)
    second = (490 + 525) * 800 + 640  # a vsync edge; the picture after it moves by one clock
    de = pins.de.copy()
    de[second:] = np.concatenate([[0], de[second:-1]])
    mon = watch(replace(pins, de=de))
    assert t.frame_cycles == 420000
    # DMT 640x480: vsync begins on line 490 at the hsync leading edge (column 640 + 16); the
    # next picture begins on line 525 = 0 of the next frame: (525 - 490) * 800 - 656 clocks later.
    first = (525 - 490) * 800 - 656
    assert f"jitter: de starts {first} to {first + 1} clocks after the vsync leading edge in " \
        "different frames" in mon.problems, mon.problems
    assert watch(pins).problems == []


def test_de_region_of_the_wrong_size_is_caught() -> None:
    """Same totals and syncs as DMT 640x480, but only 638 active pixels and 478 active lines."""
    bad = replace(VGA, horizontal=Axis(638, 18, 96, 48, "negative"),
                  vertical=Axis(478, 12, 2, 33, "negative"))  # fmt: skip
    mon = watch(model_pins(bad, "bars", (490 + 525 + 3) * 800))
    assert mon.mode is not None
    assert len(mon.problems) == 1
    assert mon.problems[0].startswith("de region does not match the 640x480 picture the syncs imply")
    assert "de is 638 pixels wide, the mode has 640" in mon.problems[0]
    assert "de is high on 478 of the mode's 480 lines" in mon.problems[0]


def test_a_format_and_its_1000_1001_variant_are_named_once() -> None:
    mon = watch(model_pins(VGA, "bars", FRAME), spec=VGA)
    # DMT 04h is 25.175 MHz; CTA VIC 1 is 25.2 MHz at 60 Hz and 25.2/1.001 MHz at 59.94 Hz (from
    # memory: CTA-861, VIC 1): a monitor cannot tell the three apart within 1 %.
    assert dict(mon.summary())["mode"] == "640x480@60 (DMT 04h; also matches CTA VIC 1 at 59.94 and 60 Hz)"


def test_a_mode_of_another_size_is_never_the_nearest() -> None:
    """An 800x480 panel (our example's figures) against a library with no 800x480 mode."""
    panel = synccore.load(Path(__file__).parents[2] / "examples" / "hobby_panel_800x480.yaml")
    t = Timing(panel)
    mon = watch(model_pins(panel, "bars", (t.v_sync_start + t.v_total + 3) * t.h_total), spec=panel)
    assert all((m.horizontal.active, m.vertical.active) != (800, 480) for m in library())
    assert mon.mode is None and mon.nearest is None
    assert mon.size == (800, 480)
    assert dict(mon.summary())["mode"] == ("no standard mode; no library mode of this size (de 800x480, "
                                           "928 clocks per line, 525 lines per frame)")  # fmt: skip
    assert mon.problems == []
    # 800 + 40 + 48 + 40 = 928 clocks, 480 + 13 + 3 + 29 = 525 lines (the example's own figures).


def test_a_picture_that_is_not_the_pattern_fails() -> None:
    """The colour one clock behind de (a pipeline stage the lead does not cover)."""
    from synccore.picture.compare import check_pattern

    pins = model_pins(VGA, "edges", FRAME)
    mon = watch(pins, spec=VGA)
    check_pattern(mon, VGA, "edges")
    assert mon.problems == []

    def late(a: np.ndarray) -> np.ndarray:
        return np.concatenate([[0], a[:-1]])

    mon = watch(replace(pins, red=late(pins.red), green=late(pins.green), blue=late(pins.blue)), spec=VGA)
    check_pattern(mon, VGA, "edges")
    # The edges pattern is a one-pixel white frame: delayed a clock, column 0 turns black on all
    # 480 lines, and columns 1 and 639 are wrong on the 478 lines between the top and the bottom.
    assert mon.problems == [
        "the picture differs from the edges pattern on 1436 pixels, first at column 0, line 0: (0, 0, 0), "
        "the pattern has (255, 255, 255)"
    ]
