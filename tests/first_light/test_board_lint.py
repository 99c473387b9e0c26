"""The board top lints clean with everything it instantiates: Verilator -Wall and Icarus
-Wall (the vendor primitives as our own blackboxes), GHDL -93 and -2008 with warnings as
errors, for every route (each family's PLL and the clock enable) and the three jobs."""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction
from pathlib import Path

import pytest

import synccore
from synccore.clocking import FAMILIES, FAMILY_KEYS
from synccore.clocking.plan import ClockPlan, make_plan
from synccore.verification.tools import Tool
from tests.emit.test_clock_hdl import DMT_640, stub_for
from tests.first_light.jobs import JOBS, plan_of
from tests.hdl import ghdl_analyse, run

pytestmark = pytest.mark.sim

# the clock-enable route from 100 MHz (ce every 4 cycles), and from 25.175 MHz (ce always 1)
# for a core without a ce input, whose reset is active low and asynchronous
NO_CE = DMT_640.replace("core: {clock_enable: true}", "core: {reset: async_low}")


def _plans() -> dict[str, ClockPlan]:
    spec = synccore.loads(DMT_640, "vga.yaml")
    plans = {key: make_plan(spec, f_board=Fraction(27 * 10**6), family=FAMILIES[key])
             for key in FAMILY_KEYS}  # fmt: skip
    plans["ce_100mhz"] = make_plan(spec, f_board=Fraction(100 * 10**6), family=None)
    plans["ce_same_clock"] = make_plan(synccore.loads(NO_CE, "vga.yaml"),
                                       f_board=Fraction(25_175_000), family=None)  # fmt: skip
    for key, job in JOBS.items():
        plans[key] = plan_of(job)
    return plans


PLANS = _plans()


def _write(plan: ClockPlan, folder: Path) -> str:
    synccore.write(plan.spec, folder, pattern="bars", clock=plan,
                   accept_clock_error=True)  # lint judges the text, not the clock error
    stub = stub_for(plan) if plan.family is not None else "`default_nettype none\n"
    (folder / "primitives.v").write_text(stub)
    (folder / "primitives_2001.v").write_text(stub.replace("= '0;", "= 0;"))  # for Icarus
    return plan.spec.name


def _verilog(name: str, stub: str = "primitives.v") -> list[str]:
    return [f"{name}.v", f"{name}_pattern.v", f"{name}_top.v", f"{name}_clock.v", stub,
            f"{name}_board.v"]  # fmt: skip


@pytest.mark.parametrize("key", list(PLANS))
def test_board_top_verilog_lints_clean(tmp_path: Path, key: str,
                                       need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    tool = need_tool("verilator")
    name = _write(PLANS[key], tmp_path)
    run(["verilator", "--lint-only", "-Wall", "--top-module", f"{name}_board",
         *_verilog(name)], tmp_path, tool.env)  # fmt: skip
    out = run(["iverilog", "-g2001", "-Wall", "-o", "board.vvp", "-s", f"{name}_board",
               *_verilog(name, "primitives_2001.v")], tmp_path)  # fmt: skip
    assert "warning" not in out.lower(), out


@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize("key", list(PLANS))
def test_board_top_vhdl_analyses_clean(tmp_path: Path, key: str, std: str,
                                       need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    name = _write(PLANS[key], tmp_path)
    for suffix in ("", "_pattern", "_top", "_clock", "_board"):
        ghdl_analyse(tmp_path / f"{name}{suffix}.vhd", std)
