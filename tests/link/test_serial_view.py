"""``view --link dvi --board``: the whole DVI top from its board clock pin, read on its pins.

The PLL and I/O primitives run as behavioural models (templates/bench/pll_models.v.j2,
io_models.v.j2); the bench samples the TMDS _p pins at the bit rate and hands each lane's
bit stream to the simulated sink with no word boundary: the sink finds it from the control
tokens.  A small made-up raster keeps each run to a second or two in Icarus.

The picture received must equal the model engine's picture pixel for pixel (the model engine
is held equal to the simulators' pictures by tests/picture/test_pattern_sim.py), the clocks
measured on the pins must be the planned ones, and a serialiser that sends bit 9 first must be
named by the sink.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import synccore
from synccore.cli import main
from synccore.clocking.families import family
from synccore.clocking.link import LinkPlan, plan_link
from synccore.model import Timing
from synccore.picture import link_serial
from synccore.picture.link import receive
from synccore.picture.monitor import watch
from synccore.picture.run import cycles_needed, model_pins
from synccore.verification.tools import Tool

pytestmark = pytest.mark.sim

# A made-up raster, small enough to run at the bit rate in a second or two (no library mode).
TINY = """\
name: tiny
pixel_clock_hz: 25 MHz
horizontal: {active: 64, front_porch: 4, sync: 8, back_porch: 4, sync_polarity: negative}
vertical:   {active: 40, front_porch: 2, sync: 2, back_porch: 3, sync_polarity: positive}
color: {red: 3, green: 3, blue: 2}
"""
TINY_CE = TINY + "core: {clock_enable: true}\n"

# family -> (board oscillator in MHz, a board clock its boards commonly carry: common practice;
# the spec). iCE40 runs the core on the serial clock with a ce, so its spec needs one.
FAMILIES = {
    "ecp5": (25, TINY),
    "ice40": (12, TINY_CE),
    "gowin": (27, TINY),
    "xc7-mmcm": (100, TINY),
    "cyclone": (50, TINY),
}


def _plan(key: str) -> LinkPlan:
    mhz, text = FAMILIES[key]
    spec = synccore.loads(text, source="tiny.yaml")
    plan = plan_link(spec, f_board=Fraction(mhz * 10**6), family=family(key))
    assert plan.ok and plan.serial_hz is not None and plan.pixel_hz is not None
    return plan


@pytest.mark.parametrize("key", list(FAMILIES))
def test_the_serial_lanes_show_the_model_picture_at_the_planned_clocks(
        key: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    plan = _plan(key)
    spec = plan.spec
    run = link_serial.simulate_dvi(plan, "bars", work_dir=tmp_path)
    assert plan.serial_hz is not None and plan.pixel_hz is not None and plan.core_hz is not None
    # the models round each edge to 1 fs: a few parts in 10^8 of these periods
    assert run.f_serial_hz == pytest.approx(float(plan.serial_hz), rel=1e-6)
    assert run.f_pixel_hz == pytest.approx(float(plan.pixel_hz), rel=1e-6)
    assert run.f_core_hz == pytest.approx(float(plan.core_hz), rel=1e-6)
    assert run.f_serial_hz == pytest.approx(5 * run.f_pixel_hz)  # contract: 5 x on DDR outputs
    assert run.mismatches == 0
    rec = receive(run.lanes)
    assert rec.problems == [] and rec.pins is not None
    dvi = watch(rec.pins, spec=spec)
    vga = watch(model_pins(spec, "bars", cycles_needed(spec)), spec=spec)
    assert dvi.problems == [] and vga.problems == []
    t = Timing(spec)
    assert (dvi.line_cycles, dvi.lines_per_frame) == (t.h_total, t.v_total)
    assert dvi.hsync_polarity == "negative" and dvi.vsync_polarity == "positive"
    assert dvi.line_rate_hz == pytest.approx(float(plan.pixel_hz) / t.h_total, rel=1e-6)
    assert dvi.refresh_hz == pytest.approx(float(plan.pixel_hz) / (t.h_total * t.v_total), rel=1e-6)
    assert dvi.mode is None and dvi.size == (64, 40)
    assert dvi.image is not None and vga.image is not None
    np.testing.assert_array_equal(np.asarray(dvi.image), np.asarray(vga.image))


def _bit9_first(text: str) -> str:
    """The serialiser with every data word's bits reversed on the way in: bit 9 goes out first."""
    # OSER10 / OSERDESE2: the word's bits wired to the data inputs one by one
    out = re.sub(r"(tmds\d)\[(\d)\]", lambda m: f"{m[1]}[{9 - int(m[2])}]", text)
    # shift-register serialisers: the whole word loaded at once
    out = re.sub(r"<= (tmds\d);", lambda m: "<= {" + ", ".join(f"{m[1]}[{i}]" for i in range(10)) + "};", out)
    assert out != text
    return out


@pytest.mark.parametrize("key", ["ecp5", "ice40", "gowin"])
def test_a_serialiser_sending_bit_9_first_is_named(
        key: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    plan = _plan(key)
    files = link_serial.dvi_sources(plan, "bars")
    name = "tiny_serialiser.v"
    mutated = {**files, name: _bit9_first(files[name])}
    monkeypatch.setattr(link_serial, "dvi_sources", lambda p, pat: mutated)
    rec = receive(link_serial.simulate_dvi(plan, "bars", work_dir=tmp_path).lanes)
    for k in range(3):
        assert any(p.startswith(f"lane {k}: bit order reversed") for p in rec.problems), rec.problems


def test_a_clock_lane_off_the_symbols_is_named(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                               need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    plan = _plan("gowin")
    files = link_serial.dvi_sources(plan, "bars")
    name = "tiny_serialiser.v"
    # the clock lane's OSER10 sends 1110000011: its rising edge two bits early
    clock = (".D0 (1'b1), .D1 (1'b1), .D2 (1'b1), .D3 (1'b1), .D4 (1'b1),\n"
             "        .D5 (1'b0), .D6 (1'b0), .D7 (1'b0), .D8 (1'b0), .D9 (1'b0),")
    assert clock in files[name]
    early = (".D0 (1'b1), .D1 (1'b1), .D2 (1'b1), .D3 (1'b0), .D4 (1'b0),\n"
             "        .D5 (1'b0), .D6 (1'b0), .D7 (1'b0), .D8 (1'b1), .D9 (1'b1),")
    mutated = {**files, name: files[name].replace(clock, early)}
    monkeypatch.setattr(link_serial, "dvi_sources", lambda p, pat: mutated)
    rec = receive(link_serial.simulate_dvi(plan, "bars", work_dir=tmp_path).lanes)
    assert rec.problems == ["clock lane: its rising edge is 2 bits before the data symbols start; the sink "
                            "cuts the symbols where the clock rises"]  # fmt: skip


def test_view_link_board_cli_reports_the_measured_clocks(tmp_path: Path,
                                                         need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    spec = tmp_path / "tiny.yaml"
    spec.write_text(TINY_CE, encoding="utf-8")
    png = tmp_path / "out.png"
    result = CliRunner().invoke(main, ["view", str(spec), "--link", "dvi", "--board", "--family", "ice40",
                                       "--board-clock", "12MHz", "-o", str(png)])  # fmt: skip
    assert result.exit_code == 0, result.output
    assert "tiny_dvi (bars) from its board clock pin, serial lanes on icarus" in result.output
    # TN1251: 12 MHz x (82 + 1) / ((0 + 1) x 2^3) = 124.5 MHz (the plan's setting)
    # the models round each edge to 1 fs: the last printed digit may be one low
    assert re.search(r"note: serial clock measured on the DVI top: 124\.(499999|500000) MHz from the "
                     r"12\.000 MHz pin \(planned 124\.500 MHz\)", result.output)
    assert re.search(r"note: pixel clock measured on the DVI top: 24\.(899999|900000) MHz", result.output)
    assert "note: the sink read the serial lanes" in result.output
    assert png.is_file()


def test_view_link_board_refuses_a_spec_the_family_cannot_link(tmp_path: Path) -> None:
    spec = tmp_path / "tiny.yaml"
    spec.write_text(TINY, encoding="utf-8")
    result = CliRunner().invoke(main, ["view", str(spec), "--link", "dvi", "--board", "--family", "ice40",
                                       "--board-clock", "12MHz"])  # fmt: skip
    assert result.exit_code == 2
    assert "core.clock_enable: must be true for a DVI link on ice40" in result.output
