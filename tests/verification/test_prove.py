"""Formal proof: every core proves for all time; mutated and edited cores fail, naming the property.

The proofs run SymbiYosys from the PyPI wheels (``pip install 'synccore[formal]'``);
each test works in its own temporary folder, so the tests run in parallel.
"""

from __future__ import annotations

import json
import re
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
from synccore.cli.main import main
from synccore.errors import SpecError
from synccore.verification import _sby
from synccore.verification.prove import ProofResult, prove_text
from tests import samples as timings
from tests.conftest import EXAMPLES
from tests.verification.test_measure import MUTANTS, TIMINGS, _small

pytestmark = pytest.mark.sim

HSYNC = "hsync polarity/position"
RESET = "reset values (while in reset and before the first advance)"

# What each mutant of the measurement tests must break first (the earliest cycle it shows).
BROKEN = {
    "front porch off by one": {HSYNC},
    "inverted hsync polarity": {RESET, HSYNC},  # wrong from the first cycle of reset on
    "x off by one": {"x"},
    "de one cycle late": {"de"},
    "line_start missing": {"line_start"},
    "frame_start missing": {"frame_start"},
}


@pytest.fixture
def need_formal(need_program: Callable[[str], str]) -> None:
    for program in _sby.missing_programs():
        need_program(program)


def _proved_by_induction(result: ProofResult) -> None:
    assert result.verdict == "PASS", (result.failed, result.trace_text, result.note)
    # inductive at a small depth: the first job (k-induction, depth 2) proves it alone
    assert [(a.engine, a.status) for a in result.attempts] == [("smtbmc z3", "PASS")]


def _check_failure(result: ProofResult, names: set[str]) -> None:
    assert result.verdict == "FAIL"
    assert result.failed and set(result.failed) <= names, result.failed
    assert result.from_reset
    assert result.vcd is not None and result.vcd.is_file()
    last = result.trace[-1]
    assert last.got != last.want  # the table ends on the cycle that breaks the property
    assert result.trace_text[0].split()[0] == "step"


@pytest.mark.parametrize("example", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_every_example_proves(example: Path, tmp_path: Path, need_formal: None) -> None:
    spec = synccore.load(example)
    if spec.interlaced:  # refused, located at the standard: line that set interlaced
        with pytest.raises(SpecError) as err:
            prove_text(spec, None, work_dir=tmp_path)
        assert [p.field for p in err.value.problems] == ["interlaced"]
        assert "progressive only so far" in str(err.value)
        return
    _proved_by_induction(prove_text(spec, None, work_dir=tmp_path))


@pytest.mark.parametrize("name", list(TIMINGS))
def test_every_core_option_proves(name: str, tmp_path: Path, need_formal: None) -> None:
    """pixels_per_clock 2/4, clock enable, every reset style, leads, zero back porches, a 1x1 raster."""
    spec = synccore.loads(TIMINGS[name], f"{name}.yaml")
    _proved_by_induction(prove_text(spec, None, work_dir=tmp_path))


@pytest.mark.parametrize("text", [timings.SCALED, timings.SCALED_PPC, timings.CTA_1080P],
                         ids=["scaled", "scaled_ppc", "cta_1080p"])  # fmt: skip
def test_scaled_and_full_size_cores_prove(text: str, tmp_path: Path, need_formal: None) -> None:
    _proved_by_induction(prove_text(synccore.loads(text), None, work_dir=tmp_path))


@pytest.mark.parametrize("ports_only", [False, True], ids=["as_generated", "ports_only"])
@pytest.mark.parametrize("mutant", list(MUTANTS))
def test_mutants_fail_with_a_counterexample(mutant: str, ports_only: bool, tmp_path: Path,
                                            need_formal: None) -> None:  # fmt: skip
    spec = synccore.loads(_small("mut", {}), "mut.yaml")
    good = synccore.render_verilog(spec)
    bad = MUTANTS[mutant][0](good)
    assert bad != good, "the mutation did not apply"
    result = prove_text(spec, bad, ports_only=ports_only, work_dir=tmp_path)
    _check_failure(result, BROKEN[mutant])


def _edited(spec: synccore.Spec) -> str:
    """The generated core with its hsync pulse ending on the line's last cycle (longer)."""
    text = synccore.render_verilog(spec)
    out = text.replace("else if (h_at_sync_end)", "else if (h_at_last)", 1)
    assert out != text
    return out


def test_edited_core_fails_naming_the_property(tmp_path: Path, need_formal: None) -> None:
    spec = synccore.loads(timings.SMALL_ALL_OPTIONS)
    core = tmp_path / "edited.v"
    core.write_text(_edited(spec))
    result = synccore.prove(spec, core=core, work_dir=tmp_path / "proof")
    _check_failure(result, {HSYNC})
    assert result.method == "PDR on the core's ports (abc pdr)"


def test_core_with_unknown_internals_proves_on_its_ports(tmp_path: Path, need_formal: None) -> None:
    """Counters renamed by hand: no invariant applies, PDR proves the ports alone."""
    spec = synccore.loads(timings.SMALL_ALL_OPTIONS)
    text = re.sub(r"\bh_pos\b", "column", re.sub(r"\bv_pos\b", "row", synccore.render_verilog(spec)))
    result = prove_text(spec, text, work_dir=tmp_path)
    assert result.verdict == "PASS", (result.failed, result.trace_text)
    assert [a.engine for a in result.attempts] == ["abc pdr"]


def test_cli_passes_an_unedited_core(tmp_path: Path, need_formal: None) -> None:
    spec_file = tmp_path / "small.yaml"
    spec_file.write_text(timings.SMALL)
    out = CliRunner().invoke(main, ["build", str(spec_file), "--out", str(tmp_path / "b")])
    assert out.exit_code == 0, out.output
    run = CliRunner().invoke(main, ["prove", str(spec_file), "--core", str(tmp_path / "b" / "small_mode.v"),
                                    "--work-dir", str(tmp_path / "w")])  # fmt: skip
    assert run.exit_code == 0, run.output
    assert run.output.startswith("small_mode: PASS: every output equals the timing model")


def test_cli_fails_an_edited_core_with_a_trace(tmp_path: Path, need_formal: None) -> None:
    spec_file = tmp_path / "small.yaml"
    spec_file.write_text(timings.SMALL)
    core = tmp_path / "edited.v"
    core.write_text(_edited(synccore.loads(timings.SMALL)))
    run = CliRunner().invoke(main, ["prove", str(spec_file), "--core", str(core), "--json",
                                    "--work-dir", str(tmp_path / "w")])  # fmt: skip
    assert run.exit_code == 1, run.output
    data = json.loads(run.output)
    assert data["verdict"] == "FAIL" and data["failed"] == [HSYNC]
    assert data["trace"][-1]["core"]["hsync"] != data["trace"][-1]["expected"]["hsync"]
    assert Path(data["vcd"]).is_file()


def test_cli_names_the_install_when_tools_are_missing(tmp_path: Path,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:  # fmt: skip
    spec_file = tmp_path / "small.yaml"
    spec_file.write_text(timings.SMALL)
    monkeypatch.setattr(_sby, "PROGRAMS", ("yowasp-sby-that-does-not-exist",))
    run = CliRunner().invoke(main, ["prove", str(spec_file)])
    assert run.exit_code == 2
    assert run.output.strip() == ("formal proof tools not found (yowasp-sby-that-does-not-exist): "
                                  "pip install 'synccore[formal]'")  # fmt: skip
