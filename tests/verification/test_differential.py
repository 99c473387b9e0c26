"""Differential campaign: random valid specs through Icarus, GHDL, Verilator and the built-in engine,
each held cycle by cycle (simulators: sim/contract_bench.py) or figure by figure (built-in) against
the reference model.

hypothesis draws the specs: pixels per clock, clock enable, every reset style, lead, scale, x/y
alignment, and extreme porches (zero back porches, one-cycle syncs).  A failing spec is shrunk by
hypothesis and written to tests/regressions/differential_<engine>.yaml; every file there is run
on every engine by :func:`test_regression_files`, so a failure found once is kept.  The default
tier runs a few examples per engine inside CI's budget; ``SYNCCORE_SLOW=1`` runs many.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import synccore
from synccore.errors import SpecError
from synccore.spec import RESETS, SCALES, VSYNC_ALIGNS
from synccore.verification.simulate import run_bench
from synccore.verification.tools import Tool
from tests.conftest import ROOT
from tests.samples import spec_text

pytestmark = pytest.mark.sim

SLOW = os.environ.get("SYNCCORE_SLOW") == "1"
REGRESSIONS = ROOT / "tests" / "regressions"
EXAMPLES = {"icarus": 40 if SLOW else 4, "ghdl": 40 if SLOW else 3, "verilator": 12 if SLOW else 1,
            "builtin": 40 if SLOW else 4}  # fmt: skip


@st.composite
def specs(draw: st.DrawFn) -> str:
    """A valid small spec (made up, for the campaign), as YAML text."""
    ppc = draw(st.sampled_from((1, 2, 4)))
    scale = draw(st.sampled_from(SCALES))

    def axis(active_step: int, step: int, most: int) -> tuple[int, int, int, int, str]:
        """Active a multiple of ``active_step``, porches and sync of ``step`` (zero porches too)."""
        return (active_step * draw(st.integers(1, most)), step * draw(st.integers(0, 3)),
                step * draw(st.integers(1, 3)), step * draw(st.integers(0, 3)),
                draw(st.sampled_from(("positive", "negative"))))  # fmt: skip

    h = axis(ppc * scale, ppc, 6)  # horizontal figures in whole clock cycles
    v = axis(scale, 1, 5)
    core = {"pixels_per_clock": ppc, "clock_enable": draw(st.booleans()),
            "reset": draw(st.sampled_from(RESETS)), "lead": draw(st.integers(0, 3)),
            "vsync_align": draw(st.sampled_from(VSYNC_ALIGNS)), "scale": scale}
    return spec_text("diff_core", "10 MHz", h, v, core=core)


def _valid(text: str) -> synccore.Spec | None:
    try:
        return synccore.loads(text, "differential.yaml")
    except SpecError:
        return None  # a near-valid draw (e.g. a lead longer than a tiny frame): not this test's job


def _check(engine: str, spec: synccore.Spec, run_dir: Path) -> tuple[bool, str]:
    if engine == "builtin":
        report = synccore.verify(spec, engines=["builtin"], work_dir=run_dir)
        return report.ok, "; ".join(report.problems())
    std = "93" if engine == "ghdl" and spec.core.pixels_per_clock % 2 else "08"
    result = run_bench(spec, simulator=engine, run_dir=run_dir, vhdl_std=std)
    return result.passed, result.log.read_text()[-3000:]


def _keep(engine: str, text: str) -> None:
    """The (shrunk) failing spec as a regression file for every later run."""
    REGRESSIONS.mkdir(exist_ok=True)
    (REGRESSIONS / f"differential_{engine}.yaml").write_text(
        f"# found by tests/verification/test_differential.py on {engine}; keep until fixed, then keep\n"
        + text, encoding="utf-8")  # fmt: skip


@pytest.mark.parametrize("engine", list(EXAMPLES))
def test_random_specs_agree_with_the_model(engine: str, tmp_path_factory: pytest.TempPathFactory,
                                           need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    if engine != "builtin":
        need_tool(engine)

    @settings(max_examples=EXAMPLES[engine], deadline=None, database=None, derandomize=not SLOW,
              suppress_health_check=list(HealthCheck))  # fmt: skip
    @given(text=specs())
    def run(text: str) -> None:
        spec = _valid(text)
        if spec is None:
            return
        ok, why = _check(engine, spec, tmp_path_factory.mktemp(engine))
        if not ok:
            _keep(engine, text)
        assert ok, f"{engine} disagrees with the model on\n{text}\n{why}"

    run()


@pytest.mark.parametrize("engine", list(EXAMPLES))
@pytest.mark.parametrize("path", sorted(REGRESSIONS.glob("*.yaml")), ids=lambda p: p.stem)
def test_regression_files(path: Path, engine: str, tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    if engine != "builtin":
        need_tool(engine)
    spec = synccore.load(path)
    ok, why = _check(engine, spec, tmp_path)
    assert ok, why
