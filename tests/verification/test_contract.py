"""A quick simulation per simulator and language proves the port contract, cycle by cycle.

The bench (sim/contract_bench.py) compares every output on every cycle with the
reference model, from reset through one frame and two lines, on small modes.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.verification.simulate import run_bench
from synccore.verification.tools import Tool
from tests import samples as timings

pytestmark = pytest.mark.sim

CASES = {
    "small": timings.SMALL,
    "tiny": timings.TINY,
    "no_back_porch": timings.NO_BACK_PORCH,
    "all_options": timings.SMALL_ALL_OPTIONS,
    "scaled_ppc": timings.SCALED_PPC,
    "interlaced": timings.SMALL_INTERLACED,
    "interlaced_opts": timings.SMALL_INTERLACED_OPTS,
}
RUNS = [("icarus", "08"), ("ghdl", "93"), ("ghdl", "08"), ("verilator", "08")]


@pytest.mark.parametrize(("simulator", "std"), RUNS, ids=["icarus", "ghdl93", "ghdl08", "verilator"])
@pytest.mark.parametrize("name", list(CASES))
def test_port_contract(name: str, simulator: str, std: str, tmp_path: Path,
                       need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    spec = synccore.loads(CASES[name], f"{name}.yaml")
    result = run_bench(spec, simulator=simulator, run_dir=tmp_path / "run", vhdl_std=std)
    assert result.passed, result.log.read_text()[-4000:]


def test_bench_catches_a_wrong_core(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    """The bench is not vacuous: a core built from a different front porch fails it."""
    need_tool("icarus")
    good = synccore.loads(timings.SMALL, "good.yaml")
    wrong = synccore.loads(timings.SMALL.replace("front_porch: 3", "front_porch: 4"), "wrong.yaml")
    result = run_bench(good, simulator="icarus", run_dir=tmp_path / "run",
                       core_text=synccore.render_verilog(wrong))  # fmt: skip
    assert not result.passed
    assert "hsync" in result.log.read_text()
