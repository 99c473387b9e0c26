"""core.scale through the measurement harness: every engine measures the divided x/y ranges.

Expected figures come from the spec: x runs 0..(active - pixels_per_clock) / scale and
y 0..(active lines - 1) / scale (integer division), with no step faults.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

import synccore
from synccore.picture.monitor import watch
from synccore.picture.run import simulate
from synccore.verification.engines import verify
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.picture.test_pattern_sim import SMALL, expected_image


@pytest.mark.sim
@pytest.mark.parametrize("text", [timings.SCALED, timings.SCALED_PPC], ids=["scale2", "ppc2_scale4"])
def test_verify_scaled(text: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    need_tool("ghdl")
    spec = synccore.loads(text)
    report = verify(spec, engines=["icarus", "ghdl", "builtin"], frames=2, work_dir=tmp_path)
    assert report.ok, report.problems()
    rows = {r.key: r for r in report.rows}
    h, v, s = spec.horizontal.active, spec.vertical.active, spec.core.scale
    assert rows["x_range"].want == f"0..{(h - spec.core.pixels_per_clock) // s}"
    assert rows["y_range"].want == f"0..{(v - 1) // s}"


@pytest.mark.parametrize("engine", [pytest.param("icarus", marks=pytest.mark.sim),
                                    pytest.param("ghdl", marks=pytest.mark.sim), "builtin"])
def test_scaled_picture(engine: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    """A 64x32 picture on a 128x64 signal: each picture pixel covers 2x2 signal pixels."""
    if engine == "builtin":
        pytest.importorskip("amaranth")
    else:
        need_tool(engine)
    text = SMALL.replace("active: 100", "active: 128").replace("active: 50", "active: 64")
    spec = synccore.loads(text + "core: {scale: 2, lead: 1}\n")
    mon = watch(simulate(spec, "grid", engine=engine, work_dir=tmp_path))
    assert mon.problems == [] and mon.image is not None
    want = expected_image("grid", 64, 32).resize((128, 64), Image.Resampling.NEAREST)
    assert np.array_equal(np.asarray(mon.image), np.asarray(want))
