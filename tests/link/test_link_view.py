"""``view --link dvi``: the first-light design sent through the emitted TMDS encoders in a real
simulator and received by the simulated DVI sink shows, pixel for pixel, the picture of the VGA
path, and the monitor names the mode.

The VGA path's picture comes from the ``model`` engine, which tests/picture/test_pattern_sim.py
holds equal to the simulators' pictures.  Each mode runs on another simulator to spread the cost.
Mode figures: CTA-861 VIC 1 and VIC 4, VESA DMT 09h (the library's entries, checked against the
published tables in tests/timings/test_modes.py).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import synccore
from synccore.cli import main
from synccore.picture.compare import check_pattern
from synccore.picture.link import receive
from synccore.picture.link_run import simulate_link
from synccore.picture.monitor import watch
from synccore.picture.run import simulate
from synccore.verification.tools import Tool

CASES = [
    ("CTA VIC 1", "icarus", "640x480@60", {"red": 3, "green": 3, "blue": 2}),
    ("DMT 09h", "ghdl", "800x600@60", {"red": 5, "green": 6, "blue": 5}),
    ("CTA VIC 4", "verilator", "1280x720@60", {"red": 8, "green": 8, "blue": 8}),
]


def _spec(standard: str, colour: dict[str, int]) -> synccore.Spec:
    text = (f"name: dvi_view\nstandard: \"{standard}\"\n"
            f"color: {{red: {colour['red']}, green: {colour['green']}, blue: {colour['blue']}}}\n")
    return synccore.loads(text, source="dvi_view.yaml")


@pytest.mark.sim
@pytest.mark.parametrize(("standard", "engine", "mode", "colour"), CASES, ids=[c[2] for c in CASES])
def test_dvi_picture_equals_the_vga_picture(standard: str, engine: str, mode: str, colour: dict[str, int],
                                            need_tool: Callable[[str], Tool], tmp_path: Path) -> None:
    need_tool(engine)
    spec = _spec(standard, colour)
    rec = receive(simulate_link(spec, "bars", engine=engine, work_dir=tmp_path))
    assert rec.problems == [] and rec.pins is not None
    dvi = watch(rec.pins, spec=spec)
    check_pattern(dvi, spec, "bars")
    vga = watch(simulate(spec, "bars", engine="model", work_dir=tmp_path), spec=spec)
    assert dvi.problems == [] and vga.problems == []
    assert dvi.mode is not None and dvi.mode.name == mode
    assert dvi.image is not None and vga.image is not None
    np.testing.assert_array_equal(np.asarray(dvi.image), np.asarray(vga.image))


def test_view_link_cli_names_the_sink_and_the_mode(tmp_path: Path) -> None:
    spec = tmp_path / "dvi_view.yaml"
    spec.write_text('name: dvi_view\nstandard: "CTA VIC 1"\n', encoding="utf-8")
    png = tmp_path / "out.png"
    result = CliRunner().invoke(main, ["view", str(spec), "--link", "dvi", "--sim", "model", "-o", str(png)])
    assert result.exit_code == 0, result.output
    assert "over a DVI link on model" in result.output
    assert "640x480@60 (CTA VIC 1" in result.output
    assert "note: the sink read the timing model through the reference encoder" in result.output
    assert "TMDS" in result.output  # the link's hardware caution
    assert png.is_file()


def test_view_link_refuses_the_builtin_engine(tmp_path: Path) -> None:
    spec = tmp_path / "dvi_view.yaml"
    spec.write_text('name: dvi_view\nstandard: "CTA VIC 1"\n', encoding="utf-8")
    result = CliRunner().invoke(main, ["view", str(spec), "--link", "dvi", "--sim", "builtin"])
    assert result.exit_code == 2
    assert "--link dvi simulates the link core on icarus, ghdl, verilator or model" in result.output
