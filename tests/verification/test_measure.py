"""Measured verification: every core, on every simulator, over full frames, against the spec.

Also shows that the measurement catches faults (mutated cores fail, naming the
quantity) and that the built-in Amaranth engine measures the same figures.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.verification.engines import run_engine
from synccore.verification.measure import compare, failures
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import EXAMPLES

pytestmark = pytest.mark.sim

SIMULATORS = ["icarus", "ghdl", "verilator"]


def _small(name: str, core: dict[str, object], h: tuple[int, int, int, int, str] = (32, 4, 8, 4, "negative"),
           v: tuple[int, int, int, int, str] = (6, 2, 2, 3, "positive")) -> str:  # fmt: skip
    return timings.spec_text(name, "10 MHz", h, v, core=core)


# Made-up timings that exercise every core option (none copied from anywhere).
TIMINGS = {
    "ppc2": _small("t_ppc2", {"pixels_per_clock": 2}),
    "ppc4_lead3": _small("t_ppc4", {"pixels_per_clock": 4, "lead": 3}),
    "ce_irregular": _small("t_ce", {"clock_enable": True}),
    "reset_sync_low": _small("t_rsl", {"reset": "sync_low"}),
    "reset_async_high": _small("t_rah", {"reset": "async_high", "clock_enable": True}),
    "reset_async_low": _small("t_ral", {"reset": "async_low", "lead": 1}),
    "lead1_line_align": _small("t_lead1", {"lead": 1, "vsync_align": "line"}),
    "lead3_ce": _small("t_lead3", {"lead": 3, "clock_enable": True}),
    # a lead longer than two lines (48 cycles each): x/y start from a later line after reset
    "lead_over_lines": _small("t_lead100", {"lead": 100}),
    "no_back_porch": timings.NO_BACK_PORCH,
    "tiny": timings.TINY,
    "all_options": timings.SMALL_ALL_OPTIONS,
}


def _check(spec: synccore.Spec, engine: str, tmp_path: Path, frames: int = 2) -> None:
    run = run_engine(spec, engine, frames=frames, work_dir=tmp_path)
    assert run.error is None, (run.error, run.log.read_text()[-3000:] if run.log else "")
    assert run.figures is not None
    rows = compare(synccore.timing(spec), {engine: run.figures})
    assert not failures(rows), failures(rows)


@pytest.mark.parametrize("simulator", SIMULATORS)
@pytest.mark.parametrize("name", list(TIMINGS))
def test_timings_measure_right(name: str, simulator: str, tmp_path: Path,
                               need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    _check(synccore.loads(TIMINGS[name], f"{name}.yaml"), simulator, tmp_path, frames=3)


@pytest.mark.parametrize("simulator", SIMULATORS)
@pytest.mark.parametrize("example", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_examples_measure_right(example: Path, simulator: str, tmp_path: Path,
                                need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    _check(synccore.load(example), simulator, tmp_path)


# ---------------------------------------------------------------- mutants

MUTANTS = {
    # front porch one cycle shorter: the hsync pulse starts a cycle early
    "front porch off by one": (
        lambda v: v.replace("H_AT_SYNC_START_FROM = 6'd35;", "H_AT_SYNC_START_FROM = 6'd34;"),
        ["h front porch", "hsync width"],
    ),
    "inverted hsync polarity": (
        lambda v: re.sub(r"(H_SYNC_OFF\s*= )1'b1;", r"\g<1>1'b0;",
                         re.sub(r"(H_SYNC_ON\s*= )1'b0;", r"\g<1>1'b1;", v)),
        ["hsync polarity"],
    ),
    "x off by one": (
        lambda v: v.replace("x <= h_pos[4:0];", "x <= h_pos[4:0] + 5'd1;"),
        ["x range"],
    ),
    "de one cycle late": (
        lambda v: v.replace("de <= !hblank_next && !vblank_next;",
                            "de <= !hblank && !vblank_next;"),
        ["first de after reset", "de = not (hblank or vblank)", "x range"],
    ),
    "line_start missing": (
        lambda v: v.replace("line_start <= h_at_zero && !vblank_next;",
                            "line_start <= 1'b0;"),
        ["line_start per frame", "line_start with de rise"],
    ),
    "frame_start missing": (
        lambda v: v.replace("frame_start <= h_at_zero && v_at_zero;",
                            "frame_start <= 1'b0;"),
        ["frame_start per frame"],
    ),
}  # fmt: skip


@pytest.mark.parametrize("mutant", list(MUTANTS))
def test_mutants_fail_naming_the_quantity(mutant: str, tmp_path: Path,
                                          need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    spec = synccore.loads(_small("mut", {}), "mut.yaml")
    good = synccore.render_verilog(spec)
    mutate, quantities = MUTANTS[mutant]
    bad = mutate(good)
    assert bad != good, "the mutation did not apply; the emitted text changed"
    run = run_engine(spec, "icarus", frames=2, work_dir=tmp_path, core_text=bad)
    assert run.figures is not None, run.error
    lines = failures(compare(synccore.timing(spec), {"icarus": run.figures}))
    named = {line.split(":")[0] for line in lines}
    for quantity in quantities:
        assert quantity in named, (quantity, lines)


# ---------------------------------------------------------------- builtin agreement

AGREE = ["ppc4_lead3", "ce_irregular", "no_back_porch", "all_options"]


@pytest.mark.parametrize("name", AGREE)
def test_builtin_agrees_with_simulators(name: str, tmp_path: Path,
                                        need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    spec = synccore.loads(TIMINGS[name], f"{name}.yaml")
    builtin = run_engine(spec, "builtin", frames=2, work_dir=tmp_path)
    assert builtin.figures is not None
    for simulator in SIMULATORS:
        need_tool(simulator)
        run = run_engine(spec, simulator, frames=2, work_dir=tmp_path)
        assert run.figures == builtin.figures, simulator
    assert not failures(compare(synccore.timing(spec), {"builtin": builtin.figures}))


def test_builtin_catches_a_wrong_spec_reading(tmp_path: Path) -> None:
    """The built-in engine is judged too: measured against another spec's numbers it fails."""
    spec = synccore.loads(TIMINGS["ppc2"], "a.yaml")
    other = synccore.loads(TIMINGS["ppc2"].replace("front_porch: 4", "front_porch: 6"), "b.yaml")
    run = run_engine(spec, "builtin", frames=2, work_dir=tmp_path)
    assert run.figures is not None
    lines = failures(compare(synccore.timing(other), {"builtin": run.figures}))
    assert any(re.match(r"h front porch: want 6 px, measured builtin: 4", x) for x in lines), lines
