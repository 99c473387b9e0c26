"""Weaving an interlaced design's two fields into one frame (synccore.picture.weave).

The first-light design of an interlaced spec draws its pattern by the core's y, which is
the frame's row (2 x line + field).  The TV-side weaving tells the fields apart by where
their vsyncs start (half a line off the hsync leading edge before field 1), weaves field
0's lines into the even rows and field 1's into the odd rows, and the picture must then
be the pattern: on the timing model, on Icarus, GHDL, Verilator and the built-in engine.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner
from PIL import Image

import synccore
from synccore.cli.main import main
from synccore.errors import SpecError
from synccore.picture.compare import check_pattern
from synccore.picture.monitor import Monitor
from synccore.picture.run import Pins, model_pins
from synccore.picture.weave import view_interlaced, weave_pins
from synccore.verification.tools import Tool
from tests import samples
from tests.conftest import EXAMPLES
from tests.picture.test_pattern_sim import expected_image

EXAMPLE = next(p for p in EXAMPLES if p.stem == "console_480i")
# Made up: small enough for the pattern (32 x 32 per field at least) and quick to simulate.
SMALL = samples.spec_text("il_view", "10 MHz", (48, 4, 6, 6, "negative"), (32, 2, 2, 3, "positive"),
                          interlaced=True)  # fmt: skip


def _slice(pins: Pins, start: int) -> Pins:
    """The pins from sample ``start`` on: a TV that starts watching mid-stream."""
    cut = {name: getattr(pins, name)[start:] for name in ("hsync", "vsync", "de", "red", "green", "blue")}
    return replace(pins, **cut)


@pytest.mark.parametrize(("name", "pattern"), [("720x576i@50", "bars"), ("720x480i@60", "grid"),
                                               ("1920x1080i@50", "edges")])  # fmt: skip
def test_model_weaves_the_library_entries(name: str, pattern: str, tmp_path: Path) -> None:
    """576i, 480i and 1080i woven into whole frames of 1440x576, 1440x480 and 1920x1080, named,
    with fields of 313/312, 263/262 and 563/562 lines and a vsync half a line off before field
    1 (864, 858, 1320 clocks) (CTA-861-G Table 1, from memory; pixel repetition 2 for 480i/576i)."""
    spec = synccore.loads(f'name: tv\nstandard: "{name}"\n', "tv.yaml")
    mon = view_interlaced(spec, pattern, engine="model", work_dir=tmp_path)
    assert mon.problems == []
    size, fields, half = {"720x576i@50": ((1440, 576), "313 / 312", 864),
                          "720x480i@60": ((1440, 480), "263 / 262", 858),
                          "1920x1080i@50": ((1920, 1080), "563 / 562", 1320)}[name]  # fmt: skip
    assert mon.image is not None and mon.image.size == size
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image(pattern, *size)))
    assert mon.mode is not None and mon.mode.name == name
    assert f"lines per field {fields}" in mon.notes[0] and f"{half} clocks after" in mon.notes[0]


def test_fields_are_told_apart_by_the_vsync_not_by_the_order() -> None:
    """Watching from field 1 on: the first field seen carries the odd rows, and is woven so."""
    spec = synccore.loads(SMALL, "il.yaml")
    t = synccore.timing(spec)
    pins = model_pins(spec, "checker", 2 * t.frame_cycles + t.vsync_starts()[0] + 2 * t.h_total)
    from_field1 = _slice(pins, t.field_lines(0) * t.h_total)
    for seen in (pins, from_field1):
        woven = weave_pins(seen)
        assert woven.problems == [] and woven.image is not None
        assert np.array_equal(np.asarray(woven.image), np.asarray(expected_image("checker", 48, 64)))


def test_no_half_line_vsync_no_frame() -> None:
    """Both vsyncs on the hsync edge (field 0's moved half a line early): no field 0 is found."""
    spec = synccore.loads(SMALL, "il.yaml")
    t = synccore.timing(spec)
    pins = model_pins(spec, "grid", t.frame_cycles + t.vsync_starts()[0] + 2 * t.h_total)
    vsync = pins.vsync.copy()
    first = t.vsync_starts()[0]
    pulse = vsync[first:first + t.vsync_cycles].copy()
    vsync[first:first + t.vsync_cycles] = 1 - pulse  # back to idle
    vsync[first - t.half_line:first - t.half_line + t.vsync_cycles] = pulse
    woven = weave_pins(replace(pins, vsync=vsync))
    assert woven.image is None
    assert woven.problems == ["no whole frame: no field whose blanking holds a vsync half a line off the "
                              "hsync leading edge followed by one whose vsync is on it"]  # fmt: skip


def test_rows_of_the_wrong_field_are_caught() -> None:
    """Field 1 drawing field 0's rows (as a core whose y ignores the field would): the woven
    picture differs from the pattern, first on row 1."""
    spec = synccore.loads(SMALL, "il.yaml")
    t = synccore.timing(spec)
    pins = model_pins(spec, "grid", t.frame_cycles + t.vsync_starts()[0] + 2 * t.h_total)
    f1 = t.field_lines(0) * t.h_total
    colours = {c: getattr(pins, c).copy() for c in ("red", "green", "blue")}
    for c in colours:
        colours[c][f1:f1 + t.v_active * t.h_total] = getattr(pins, c)[: t.v_active * t.h_total]
    woven = weave_pins(replace(pins, **colours))
    mon = Monitor(period_s=pins.period_s, image=woven.image)
    check_pattern(mon, spec, "grid")
    assert len(mon.problems) == 1 and mon.problems[0].startswith("the picture differs from the grid "
                                                                 "pattern on "), mon.problems  # fmt: skip
    assert "first at column 1, line 1:" in mon.problems[0], mon.problems


# Made up: 2 pixels per clock, clock enable, vsync at the line start, a port prefix.
SMALL_OPTS = samples.spec_text("il_view_opts", "10 MHz", (48, 4, 6, 6, "positive"), (32, 2, 2, 3, "negative"),
                               core={"pixels_per_clock": 2, "clock_enable": True, "vsync_align": "line"},
                               prefix="tv_", interlaced=True)  # fmt: skip
ENGINES = [(engine, case) for engine in ("model", "icarus", "ghdl", "verilator", "builtin")
           for case in ("plain", "opts")]  # fmt: skip


@pytest.mark.sim
@pytest.mark.parametrize(("engine", "case"), ENGINES, ids=[f"{e}-{c}" for e, c in ENGINES])
def test_simulated_design_weaves_into_the_pattern(engine: str, case: str, tmp_path: Path,
                                                  need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    if engine not in ("builtin", "model"):
        need_tool(engine)
    spec = synccore.loads(SMALL if case == "plain" else SMALL_OPTS, "il.yaml")
    mon = view_interlaced(spec, "checker", engine=engine, work_dir=tmp_path)
    assert mon.problems == []
    assert mon.image is not None
    assert np.array_equal(np.asarray(mon.image), np.asarray(expected_image("checker", 48, 64)))
    where = "hsync leading edge" if case == "plain" else "start"
    assert f"starts 32 clocks after its line's {where}, half a line" in mon.notes[0]  # 64 / 2


@pytest.mark.sim
def test_view_cli_weaves_the_example(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    out = tmp_path / "tv.png"
    result = CliRunner().invoke(main, ["view", str(EXAMPLE), "--pattern", "bars", "-o", str(out)])
    assert result.exit_code == 0, result.output
    # CTA-861 VIC 6 at 27 MHz: 15.734 kHz lines, 59.940 fields per second, 525 lines per frame
    # (CTA-861-G Table 1, from memory)
    assert "15.734 kHz" in result.output and "59.940 Hz (525 lines)" in result.output
    assert "720x480i@59.94" in result.output and "263 / 262" in result.output
    got = np.asarray(Image.open(out).convert("RGB"))
    assert np.array_equal(got, np.asarray(expected_image("bars", 1440, 480)))


def test_view_cli_refuses_board_and_link_for_interlaced(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["view", str(EXAMPLE), "--link", "dvi", "-o", str(tmp_path / "x.png")])
    assert result.exit_code == 2
    assert "--board and --link are progressive only so far" in result.output
    result = CliRunner().invoke(main, ["view", str(EXAMPLE), "--sim", "model", "--monitor-range",
                                       "15-16kHz,50-61Hz", "-o", str(tmp_path / "x.png")])  # fmt: skip
    assert result.exit_code == 2
    assert "--edid, --dac and --monitor-range do not apply to an interlaced spec yet" in result.output
    assert not (tmp_path / "x.png").exists()


def test_write_gives_the_pattern_and_refuses_benches_board_and_link(tmp_path: Path) -> None:
    spec = synccore.load(EXAMPLE)
    written = synccore.write(spec, tmp_path / "ok", pattern="bars")
    assert sorted(p.name for p in written if p.suffix == ".v") == [
        "console_480i.v", "console_480i_pattern.v", "console_480i_top.v"]
    with pytest.raises(SpecError, match="the stand-alone test benches are progressive only so far"):
        synccore.write(spec, tmp_path / "tb", testbench=True)
    plan = synccore.plan_clock(spec, "27 MHz", "ice40")
    with pytest.raises(SpecError, match="the board top and DVI design are progressive only so far"):
        synccore.write(spec, tmp_path / "board", pattern="bars", clock=plan, accept_clock_error=True)
