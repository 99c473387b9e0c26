"""`synccore view SPEC --vcd`: the user's own simulation checked against the spec it is meant to send."""

from __future__ import annotations

import subprocess
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

from synccore.cli.main import main
from tests.picture.test_vcd import DESIGN, MAP

# The hand-written design of tests/picture/test_vcd.py: 40 3 5 6 / 30 2 2 3, hsync negative,
# vsync positive, a 10 ns clock (100 MHz).
SPEC = """name: own
pixel_clock_hz: 100 MHz
horizontal: {{active: 40, front_porch: {fp}, sync: 5, back_porch: {bp}, sync_polarity: negative}}
vertical: {{active: 30, front_porch: 2, sync: 2, back_porch: 3, sync_polarity: positive}}
"""


@pytest.fixture
def vcd_file(tmp_path: Path, need_program: Callable[[str], str]) -> Path:
    need_program("iverilog")
    (tmp_path / "bench.v").write_text(DESIGN)
    subprocess.run(["iverilog", "-o", "bench.vvp", "bench.v"], cwd=tmp_path, check=True)
    subprocess.run(["vvp", "-n", "bench.vvp"], cwd=tmp_path, check=True, capture_output=True)
    return tmp_path / "run.vcd"


@pytest.mark.sim
def test_vcd_against_its_own_spec(vcd_file: Path, tmp_path: Path) -> None:
    spec = tmp_path / "own.yaml"
    spec.write_text(SPEC.format(fp=3, bp=6))
    args = ["view", str(spec), "--vcd", str(vcd_file), "--map", MAP, "-o", str(tmp_path / "s.png")]
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 0, result.output
    assert "Hardware (LCD panel)" in result.output  # no library mode of this size: a panel's caution
    # The same run against a spec with one more back-porch clock: the design is one clock early.
    spec.write_text(SPEC.format(fp=2, bp=7))
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 1
    assert ("PROBLEM the design does not send its spec's timing: de starts 11 clocks after the hsync "
            "leading edge, the spec's sync + back porch is 12 (picture shifted by -1 pixel)") in \
        " ".join(result.output.split())  # fmt: skip
