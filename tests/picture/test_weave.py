"""Weaving an interlaced core's two fields into one frame (synccore.picture.weave).

The woven picture is the coordinate pattern at the core's x/y; field 0's lines are the
frame's even rows and field 1's the odd rows (model/fields.py).  It must equal the
pattern drawn at the frame's own columns and rows for a correct core, on the timing
model and on a simulator, and must not for a core whose y or field output is wrong.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner
from PIL import Image

import synccore
from synccore.cli.main import main
from synccore.picture.weave import (
    check_woven,
    coordinate_colours,
    lines_from_events,
    lines_from_model,
    view_interlaced,
    weave,
)
from synccore.verification.engines import run_engine
from synccore.verification.tools import Tool
from tests import samples
from tests.conftest import EXAMPLES

EXAMPLE = next(p for p in EXAMPLES if p.stem == "console_480i")


def _pattern(width: int, rows: int) -> np.ndarray:
    return coordinate_colours(np.arange(width)[None, :], np.arange(rows)[:, None])


def test_coordinate_colours_tell_every_position_apart() -> None:
    x, y = np.meshgrid(np.arange(0, 4096, 7), np.arange(0, 4096, 5))
    colours = coordinate_colours(x, y).reshape(-1, 3)
    assert len({tuple(c) for c in colours}) == x.size


@pytest.mark.parametrize("name", ["720x576i@50", "720x480i@60", "1920x1080i@50"])
def test_model_weaves_the_library_entries(name: str) -> None:
    """The model's lines weave into the whole frame: 576i 1440x576, 480i 1440x480, 1080i
    1920x1080 (CTA-861-G Table 1, from memory: pixel repetition 2 sends 720 pixels as 1440)."""
    t = synccore.timing(synccore.loads(f'name: tv\nstandard: "{name}"\n', "tv.yaml"))
    woven = weave(lines_from_model(t), t)
    check_woven(woven, t)
    assert woven.problems == []
    size = {"720x576i@50": (1440, 576), "720x480i@60": (1440, 480), "1920x1080i@50": (1920, 1080)}[name]
    assert woven.image is not None and woven.image.size == size
    assert np.array_equal(np.asarray(woven.image), _pattern(*size))


def test_swapped_fields_are_caught() -> None:
    """Field 1's lines woven as field 0's: the field output and the rows both disagree."""
    t = synccore.timing(synccore.loads(samples.SMALL_INTERLACED, "il.yaml"))
    lines = lines_from_model(t)
    half = len(lines) // 2
    field0, field1 = lines[:half], lines[half:]
    # field 1 first (a frame's time earlier), carrying the frame_start
    moved = [replace(ln, start=ln.start - t.frame_cycles, frame_start=k == 0) for k, ln in enumerate(field1)]
    moved += [replace(ln, frame_start=False) for ln in field0]
    woven = weave(moved, t)
    check_woven(woven, t)
    wrong_field = "field output: 6 of field 0's 6 active lines show field 1"
    assert any(p.startswith(wrong_field) for p in woven.problems), woven.problems
    assert any(p.startswith("the woven picture differs") for p in woven.problems), woven.problems


@pytest.mark.sim
def test_simulated_core_weaves_right(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    spec = synccore.loads(samples.SMALL_INTERLACED, "il.yaml")
    mon = view_interlaced(spec, engine="icarus", work_dir=tmp_path)
    assert mon.problems == []
    assert mon.image is not None and mon.image.size == (20, 12)  # 20 pixels, 2 x 6 rows
    assert np.array_equal(np.asarray(mon.image), _pattern(20, 12))


WRONG = {
    "y not interlaced": (lambda v: re.sub(r"y <= \{v_pos\[(\d+):0\], fld\};",
                                          r"y <= {1'b0, v_pos[\1:0]};", v),
                         r"the woven picture differs from the coordinate pattern on \d+ pixels, first at "
                         r"column 0, row 1 \(field 1's line 0\): the core put out x = 0, y = 0 there"),
    "field stuck at 0": (lambda v: v.replace("field <= fld;", "field <= 1'b0;"),
                         r"field output: 6 of field 1's 6 active lines show field 0, first its line 0"),
}  # fmt: skip


@pytest.mark.sim
@pytest.mark.parametrize("fault", list(WRONG))
def test_wrong_core_weaves_wrong(fault: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    spec = synccore.loads(samples.SMALL_INTERLACED, "il.yaml")
    mutate, problem = WRONG[fault]
    good = synccore.render_verilog(spec)
    bad = mutate(good)
    assert bad != good
    run = run_engine(spec, "icarus", frames=2, work_dir=tmp_path, core_text=bad)
    t = synccore.timing(spec)
    woven = weave(lines_from_events(run.events), t)
    check_woven(woven, t)
    assert any(re.fullmatch(problem, p) for p in woven.problems), woven.problems


def test_view_cli_weaves_the_example(tmp_path: Path) -> None:
    out = tmp_path / "tv.png"
    result = CliRunner().invoke(main, ["view", str(EXAMPLE), "--sim", "model", "-o", str(out)])
    assert result.exit_code == 0, result.output
    # CTA-861 VIC 6 at 27 MHz: 15.734 kHz lines, 59.940 fields per second, 525 lines
    # per frame (CTA-861-G Table 1, from memory)
    assert "15.734 kHz" in result.output and "59.940 Hz (525 lines)" in result.output
    assert "720x480i@59.94" in result.output and "263 / 262" in result.output
    assert np.array_equal(np.asarray(Image.open(out).convert("RGB")), _pattern(1440, 480))


@pytest.mark.sim
def test_view_cli_weaves_a_simulated_core(tmp_path: Path, need_tool: Callable[[str], Tool],
                                          write_spec) -> None:  # type: ignore[no-untyped-def]  # fmt: skip
    need_tool("icarus")
    path = write_spec(samples.SMALL_INTERLACED)
    out = tmp_path / "il.png"
    result = CliRunner().invoke(main, ["view", str(path), "--sim", "icarus", "-o", str(out)])
    assert result.exit_code == 0, result.output
    assert "woven" in result.output
    assert np.array_equal(np.asarray(Image.open(out).convert("RGB")), _pattern(20, 12))


def test_view_cli_refuses_board_and_link_for_interlaced(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["view", str(EXAMPLE), "--link", "dvi", "-o", str(tmp_path / "x.png")])
    assert result.exit_code == 2
    assert "interlaced specs do not have yet" in result.output
    assert not (tmp_path / "x.png").exists()
