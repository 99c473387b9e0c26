"""Multi-mode cores under a switching sequence, on every simulator, cycle by cycle and frame by frame.

The bench (sim/multimode_bench.py) drives 20 seeded mode changes at random cycles among
the modes and judges every cycle against the model and every frame against its own mode.
Two mutants show it is not vacuous and that it names what went wrong: a core whose mode
input takes effect at once (mid-frame), and a core that reads the mode input at the end
of a frame's first line instead of its last.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.verification.multimode_run import run_switching
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import MULTI_MODE_EXAMPLES

pytestmark = pytest.mark.sim

RUNS = [("icarus", "08"), ("ghdl", "93"), ("ghdl", "08"), ("verilator", "08")]
RUN_IDS = ["icarus", "ghdl93", "ghdl08", "verilator"]
CASES = {"small": timings.MULTI_SMALL, "opts": timings.MULTI_SMALL_OPTS}


def _failure(run: object) -> str:
    return run.result.log.read_text()[-4000:]  # type: ignore[attr-defined]


@pytest.mark.parametrize(("simulator", "std"), RUNS, ids=RUN_IDS)
@pytest.mark.parametrize("name", list(CASES))
def test_switching_sequence(name: str, simulator: str, std: str, tmp_path: Path,
                            need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    spec = synccore.loads(CASES[name], f"{name}.yaml")
    run = run_switching(spec, simulator=simulator, run_dir=tmp_path / "run", vhdl_std=std,
                        seed=7, changes=20)  # fmt: skip
    assert run.passed, _failure(run)
    assert len(run.changes) == 20
    modes = {f["mode"] for f in run.frames}
    assert modes == {0, 1, 2}, modes  # the sequence reached every mode
    switches = sum(a["mode"] != b["mode"] for a, b in zip(run.frames, run.frames[1:], strict=False))
    assert switches >= 10, switches


@pytest.mark.parametrize("simulator", ["icarus", "ghdl"])
def test_two_and_sixteen_modes(simulator: str, tmp_path: Path,
                               need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    for name, text in (("two", timings.MULTI_TWO), ("sixteen", timings.MULTI_SIXTEEN)):
        spec = synccore.loads(text, f"{name}.yaml")
        run = run_switching(spec, simulator=simulator, run_dir=tmp_path / name, seed=3, changes=20)
        assert run.passed, _failure(run)


# ---------------------------------------------------------------- mutants

MUTANTS = {
    # The switch logic removed: the mode input drives the constants straight, so a change
    # takes effect at once, in the middle of a frame.
    "switch logic removed": (
        lambda v: v.replace("case (cur_mode)", "case (mode)")
                   .replace("mode_active <= cur_mode;", "mode_active <= mode;"),
        ["mode_active changed mid-frame", "a torn frame: line count"],
    ),
    # The sample point moved mid-frame: the mode input read at the end of the first line.
    "sample point mid-frame": (
        lambda v: v.replace("wire frame_end = h_at_last && (v_pos == c_v_last);",
                            "wire frame_end = h_at_last && v_at_zero;"),
        ["mode_active changed mid-frame", "a torn frame: line count"],
    ),
}  # fmt: skip


@pytest.mark.parametrize("mutant", list(MUTANTS))
def test_mutants_fail_naming_the_fault(mutant: str, tmp_path: Path,
                                       need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    spec = synccore.loads(timings.MULTI_SMALL, "mut.yaml")
    good = synccore.render_verilog(spec)
    mutate, names = MUTANTS[mutant]
    bad = mutate(good)
    assert bad != good, "the mutation did not apply; the emitted text changed"
    run = run_switching(spec, simulator="icarus", run_dir=tmp_path / "run", core_text=bad, seed=7)
    assert not run.passed
    log = run.result.log.read_text()
    for name in names:
        assert name in log, (name, log[-3000:])
    assert re.search(r"frame \d+ \(edge \d+\): a torn frame: line count \d+, mode \d expects \d+", log)


@pytest.mark.parametrize("example", MULTI_MODE_EXAMPLES, ids=[p.stem for p in MULTI_MODE_EXAMPLES])
def test_example_switches_on_icarus(example: Path, tmp_path: Path,
                                    need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
X
    need_tool("icarus")
    spec = synccore.load(example)
    run = run_switching(spec, simulator="icarus", run_dir=tmp_path / "run", seed=2, changes=2)
    assert run.passed, _failure(run)
