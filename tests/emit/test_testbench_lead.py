"""The self-checking benches judge x/y from the model's lead-shifted start: a core of another lead fails."""

from __future__ import annotations

import subprocess
from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.emit.bench.testbench import render_testbench
from tests import samples

pytestmark = pytest.mark.sim


def _write(out: Path, bench_spec: synccore.Spec, core_spec: synccore.Spec) -> str:
    name = bench_spec.name
    (out / f"{name}.v").write_text(synccore.render_verilog(core_spec))
    (out / f"{name}.vhd").write_text(synccore.render_vhdl(core_spec))
    (out / f"{name}_tb.v").write_text(render_testbench(bench_spec, "verilog", frames=1))
    (out / f"{name}_tb.vhd").write_text(render_testbench(bench_spec, "vhdl", frames=1))
    return name


@pytest.mark.parametrize("core_lead", [2, 4])
def test_a_core_of_another_lead_fails(core_lead: int, tmp_path: Path,
                                      need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("iverilog")
    need_program("ghdl")
    # SMALL_ALL_OPTIONS has lead 3; only x and y differ in a core of lead 2 or 4.
    bench = synccore.loads(samples.SMALL_ALL_OPTIONS, "a.yaml")
    core = synccore.loads(samples.SMALL_ALL_OPTIONS.replace("lead: 3", f"lead: {core_lead}"), "b.yaml")
    name = _write(tmp_path, bench, core)
    subprocess.run(["iverilog", "-g2001", "-o", "tb", f"{name}.v", f"{name}_tb.v"], cwd=tmp_path, check=True)
    text = subprocess.run(["vvp", "-n", "tb"], cwd=tmp_path, check=True, capture_output=True,
                          text=True).stdout  # fmt: skip
    assert f"FAIL {name}:" in text, text
    first = next(line for line in text.splitlines() if line.startswith("MISMATCH"))
    got, want = first.split("got ")[1].split(", want ")
    assert got.split(" x=")[0] == want.split(" x=")[0], first  # syncs, de and blanks agree: x/y do not
    subprocess.run(["ghdl", "-a", "--std=08", f"{name}.vhd", f"{name}_tb.vhd"], cwd=tmp_path, check=True)
    subprocess.run(["ghdl", "-e", "--std=08", f"{name}_tb"], cwd=tmp_path, check=True)
    proc = subprocess.run(["ghdl", "-r", "--std=08", f"{name}_tb"], cwd=tmp_path, capture_output=True,
                          text=True)  # fmt: skip
    assert proc.returncode != 0 and f"FAIL {name}:" in proc.stdout + proc.stderr


def test_the_same_lead_passes(tmp_path: Path, need_program: Callable[[str], str]) -> None:
    """The pair to the failing cases: the bench with its own core passes (one frame)."""
    need_program("iverilog")
    spec = synccore.loads(samples.SMALL_ALL_OPTIONS, "a.yaml")
    name = _write(tmp_path, spec, spec)
    subprocess.run(["iverilog", "-g2001", "-o", "tb", f"{name}.v", f"{name}_tb.v"], cwd=tmp_path, check=True)
    text = subprocess.run(["vvp", "-n", "tb"], cwd=tmp_path, check=True, capture_output=True,
                          text=True).stdout  # fmt: skip
    assert f"PASS {name}: every output matched on every cycle for 1 frames" in text, text
