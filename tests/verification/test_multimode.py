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


@pytest.mark.parametrize("simulator", ["icarus", "ghdl", "verilator"])
def test_events_bench_on_small_modes(simulator: str, tmp_path: Path,
                                     need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    """The bench for full-size modes (woken on output changes) passes the same sequence."""
    need_tool(simulator)
    spec = synccore.loads(timings.MULTI_SMALL, "small.yaml")
    run = run_switching(spec, simulator=simulator, run_dir=tmp_path / "run", seed=7, bench="events")
    assert run.passed, _failure(run)
    assert {f["mode"] for f in run.frames} == {0, 1, 2}


def test_events_bench_catches_a_mutant(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    need_tool("icarus")
    spec = synccore.loads(timings.MULTI_SMALL, "mut.yaml")
    mutate, names = MUTANTS["switch logic removed"]
    run = run_switching(spec, simulator="icarus", run_dir=tmp_path / "run", seed=7, bench="events",
                        core_text=mutate(synccore.render_verilog(spec)))  # fmt: skip
    assert not run.passed
    log = run.result.log.read_text()
    assert all(name in log for name in names), log[-3000:]


@pytest.mark.parametrize("example", MULTI_MODE_EXAMPLES, ids=[p.stem for p in MULTI_MODE_EXAMPLES])
def test_example_switches(example: Path, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    """The example's real modes (420 000 to 1 083 264 cycles a frame), two changes, on Verilator
    (the fastest here: the events bench runs about 4 million cycles in about half a minute)."""
    need_tool("verilator")
    spec = synccore.load(example)
    run = run_switching(spec, simulator="verilator", run_dir=tmp_path / "run", seed=2, changes=2,
                        bench="events")  # fmt: skip
    assert run.passed, _failure(run)
    assert len({f["mode"] for f in run.frames}) >= 2
