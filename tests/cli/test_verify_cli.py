"""`synccore verify` and `build --verify` from the command line."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

from synccore.cli.main import main
from synccore.verification.tools import Tool
from tests import samples as timings

pytestmark = pytest.mark.sim


def test_verify_prints_table_and_passes(tmp_path: Path, write_spec,  # type: ignore[no-untyped-def]
                                        need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool("icarus")
    need_tool("ghdl")
    path = write_spec(timings.SMALL_ALL_OPTIONS)
    result = CliRunner().invoke(main, ["verify", str(path), "--sim", "icarus,ghdl,builtin",
                                       "--frames", "3"])  # fmt: skip
    assert result.exit_code == 0, result.output
    out = result.output
    for label in ("line total", "hsync width", "h front porch", "v back porch", "vsync polarity",
                  "x range", "line_start per frame", "frame_start per frame"):  # fmt: skip
        assert label in out
    assert "all measured figures match the spec" in out
    assert "Amaranth model" in out and "not the emitted Verilog/VHDL text" in out


# Verilator: its harness build is made by synccore, with tracing only when waves are asked for.
@pytest.mark.parametrize("simulator", ["icarus", "verilator"])
def test_verify_waves(tmp_path: Path, write_spec, simulator: str,  # type: ignore[no-untyped-def]
                      need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    need_tool(simulator)
    path = write_spec(timings.SMALL)
    work = tmp_path / "runs"
    result = CliRunner().invoke(main, ["verify", str(path), "--sim", simulator, "--waves",
                                       "--work-dir", str(work)])  # fmt: skip
    assert result.exit_code == 0, result.output
    waves = [p for p in (work / simulator).rglob("*") if p.suffix in (".fst", ".vcd")]
    assert waves and waves[0].stat().st_size > 0, result.output


def test_unknown_engine_is_refused(write_spec) -> None:  # type: ignore[no-untyped-def]
    path = write_spec(timings.SMALL)
    result = CliRunner().invoke(main, ["verify", str(path), "--sim", "modelsim"])
    assert result.exit_code == 2
    assert "unknown engine 'modelsim'; choose from icarus, ghdl, verilator, builtin" in result.output


def test_build_then_verify(tmp_path: Path, write_spec,  # type: ignore[no-untyped-def]
                           need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    for name in ("icarus", "ghdl", "verilator"):
        need_tool(name)
    path = write_spec(timings.TINY)
    result = CliRunner().invoke(main, ["build", str(path), "--out", str(tmp_path / "out"),
                                       "--verify"])  # fmt: skip
    assert result.exit_code == 0, result.output
    assert "all measured figures match the spec" in result.output
