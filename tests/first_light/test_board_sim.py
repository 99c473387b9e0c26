"""The board top simulated from its clock pin: the PLL models give the planned clock from
the primitives' parameters, the reset waits for lock, and the pins draw the pattern.

The vendors publish no open simulation model of their PLLs; the board bench runs our
behavioural models (templates/bench/pll_models.v.j2), which compute each output from the
primitive's parameters by the vendor's formula.  So a wrong divider in a clock wrapper
shows up here as a wrong measured clock, independently of the planner's own arithmetic.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import synccore
from synccore.cli import main
from synccore.clocking import FAMILIES, FAMILY_KEYS
from synccore.clocking.plan import ClockPlan, make_plan
from synccore.picture import run as run_module
from synccore.picture.compare import check_pattern
from synccore.picture.monitor import watch
from synccore.picture.run import board_sources, model_pins, simulate_board
from synccore.verification.tools import Tool
from tests.emit.test_clock_hdl import DMT_640
from tests.first_light.jobs import JOBS, plan_of

pytestmark = pytest.mark.sim

# each family with a board oscillator its boards commonly carry (common practice)
BOARD_MHZ = {"ice40": 12, "ecp5": 25, "gowin": 27, "xc7-mmcm": 100, "xc7-pll": 100,
             "cyclone": 50}  # fmt: skip


def _measured_is_planned(plan: ClockPlan, f_core_hz: float) -> None:
    assert plan.best is not None
    # the models round each edge to 1 fs, a few parts in 10^8 of these periods
    assert f_core_hz == pytest.approx(float(plan.best.f_out), rel=1e-6)


@pytest.mark.parametrize("key", [*FAMILY_KEYS, None])
def test_every_family_clock_primitive_gives_the_planned_clock(
        tmp_path: Path, key: str | None, need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    spec = synccore.loads(DMT_640, "vga.yaml")
    mhz = BOARD_MHZ.get(key or "", 100)
    plan = make_plan(spec, f_board=Fraction(mhz * 10**6), family=FAMILIES[key] if key else None)
    run = simulate_board(plan, "bars", work_dir=tmp_path, cycles=3000)
    _measured_is_planned(plan, run.f_core_hz)
    # the pins start in the first core cycle after reset: the first line begins at once
    assert run.pins.cycles == 3000


def test_a_wrong_divider_in_the_wrapper_shows_as_a_wrong_clock(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    plan = plan_of(JOBS["ice40_hx8k_vga800"])
    files = board_sources(plan, "bars")
    wrapper = files["vga800_clock.v"]
    # TN1251: 12 MHz x (53 + 1) / ((0 + 1) x 2^4) = 40.5 MHz
    assert ".DIVF(7'd53)" in wrapper and ".DIVQ(3'd4)" in wrapper
    mutated = {**files, "vga800_clock.v": wrapper.replace(".DIVF(7'd53)", ".DIVF(7'd54)")}
    monkeypatch.setattr(run_module, "board_sources", lambda p, pat: mutated)
    run = simulate_board(plan, "bars", work_dir=tmp_path, cycles=2000)
    assert run.f_core_hz == pytest.approx(12e6 * 55 / 16, rel=1e-6)  # 41.25 MHz, not 40.5


@pytest.mark.parametrize("key", list(JOBS))
def test_the_board_tops_pins_draw_the_pattern_at_the_planned_clock(
        tmp_path: Path, key: str, need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    plan = plan_of(JOBS[key])
    spec = plan.spec
    run = simulate_board(plan, "bars", work_dir=tmp_path)
    _measured_is_planned(plan, run.f_core_hz)
    mon = watch(run.pins, spec=spec)
    check_pattern(mon, spec, "bars")
    assert mon.problems == []
    # the same picture as the timing model's pins, pixel for pixel
    want = watch(model_pins(spec, "bars", run.pins.cycles // spec.core.pixels_per_clock), spec=spec)
    assert mon.image is not None and want.image is not None
    assert np.array_equal(np.asarray(mon.image), np.asarray(want.image))


def test_view_board_passes_on_the_spec_clock_write_adjusted(
        tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    # VESA DMT 800x600@60 (40 MHz) from a 12 MHz iCE40 board: the PLL reaches 39.75 MHz,
    # -0.625 %, outside the +/-0.5 % tolerance (VESA DMT, from memory)
    spec = tmp_path / "vga800.yaml"
    spec.write_text("name: vga800\nstandard: 800x600@60\ncore: {lead: 1}\n"
                    "board: {clock_hz: 12 MHz, family: ice40}\n")  # fmt: skip
    runner = CliRunner()
    refused = runner.invoke(main, ["view", str(spec), "--board", "-o", str(tmp_path / "a.png")])
    assert refused.exit_code != 0
    assert "--board:" in refused.output and "--write" in refused.output
    fixed = tmp_path / "fixed.yaml"
    assert runner.invoke(main, ["clock", str(spec), "--write", str(fixed)]).exit_code == 0
    png = tmp_path / "board.png"
    result = runner.invoke(main, ["view", str(fixed), "--board", "-o", str(png)])
    assert result.exit_code == 0, result.output
    assert "core clock measured on the board top: 39.750000 MHz" in result.output
    assert "800x600@60 (DMT 09h)" in result.output
    assert png.is_file()
