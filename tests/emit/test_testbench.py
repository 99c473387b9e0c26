"""The stand-alone self-checking test benches: PASS on the emitted cores, FAIL on wrong ones."""

from __future__ import annotations

import subprocess
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
from synccore.cli.main import main
from tests import samples as timings
from tests.verification.test_measure import TIMINGS

pytestmark = pytest.mark.sim

CASES = {
    "all_options": timings.SMALL_ALL_OPTIONS,
    "no_back_porch": timings.NO_BACK_PORCH,
    "tiny": timings.TINY,
    "ppc4_lead3": TIMINGS["ppc4_lead3"],
    "reset_async_high": TIMINGS["reset_async_high"],
    "lead1_line_align": TIMINGS["lead1_line_align"],
}


def _build(text: str, out: Path) -> synccore.Spec:
    spec_path = out.parent / "spec.yaml"
    spec_path.write_text(text)
    result = CliRunner().invoke(main, ["build", str(spec_path), "--out", str(out), "--testbench"])
    assert result.exit_code == 0, result.output
    return synccore.load(spec_path)


def _icarus(out: Path, name: str) -> str:
    subprocess.run(["iverilog", "-g2001", "-o", "tb", f"{name}.v", f"{name}_tb.v"], cwd=out, check=True)
    return subprocess.run(["vvp", "-n", "tb"], cwd=out, check=True, capture_output=True,
                          text=True).stdout  # fmt: skip


def _ghdl(out: Path, name: str, std: str) -> subprocess.CompletedProcess[str]:
    work = out / f"work{std}"
    work.mkdir(exist_ok=True)
    args = [f"--std={std}", f"--workdir={work.name}"]
    subprocess.run(["ghdl", "-a", *args, f"{name}.vhd", f"{name}_tb.vhd"], cwd=out, check=True)
    subprocess.run(["ghdl", "-e", *args, f"{name}_tb"], cwd=out, check=True)
    return subprocess.run(["ghdl", "-r", *args, f"{name}_tb"], cwd=out, capture_output=True, text=True)


@pytest.mark.parametrize("name", list(CASES))
def test_testbench_passes_in_icarus(name: str, tmp_path: Path,
                                    need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("iverilog")
    spec = _build(CASES[name], tmp_path / "out")
    out = _icarus(tmp_path / "out", spec.name)
    assert f"PASS {spec.name}: every output matched on every cycle for 2 frames" in out, out


@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize("name", list(CASES))
def test_testbench_passes_in_ghdl(name: str, std: str, tmp_path: Path,
                                  need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    spec = _build(CASES[name], tmp_path / "out")
    proc = _ghdl(tmp_path / "out", spec.name, std)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert f"PASS {spec.name}: every output matched on every cycle for 2 frames" in proc.stdout


def test_testbench_fails_a_wrong_core(tmp_path: Path, need_program: Callable[[str], str]) -> None:
    need_program("iverilog")
    need_program("ghdl")
    out = tmp_path / "out"
    spec = _build(timings.SMALL, out)
    wrong = synccore.loads(timings.SMALL.replace("sync: 4", "sync: 5"), "wrong.yaml")
    (out / f"{spec.name}.v").write_text(synccore.render_verilog(wrong))
    (out / f"{spec.name}.vhd").write_text(synccore.render_vhdl(wrong))
    text = _icarus(out, spec.name)
    assert f"FAIL {spec.name}:" in text and "MISMATCH cycle" in text, text
    assert text.count("MISMATCH") == 10  # only the first mismatches are printed
    proc = _ghdl(out, spec.name, "08")
    assert f"FAIL {spec.name}:" in proc.stdout + proc.stderr
    assert proc.returncode != 0
