"""The emitted encoder text: lint-clean in every tool, golden, ports and header as the contract says."""

from __future__ import annotations

import re
from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.link.encoder import ENCODER_LATENCY, encoder_module, render_encoder
from synccore.model.tmds import CONTROL_TOKENS
from synccore.spec import Spec
from synccore.verification.tools import Tool
from tests import golden_files
from tests.hdl import ghdl_analyse, iverilog_compile, verilator_lint
from tests.link.specs import EXAMPLES, variant

VARIANTS = [(1, False), (1, True), (2, False), (2, True)]


def _spec(ppc: int, ce: bool) -> Spec:
    return variant("monitor_1280x720.yaml", ppc=ppc, ce=ce)


def _write(tmp_path: Path, ppc: int, ce: bool, language: str) -> Path:
    spec = _spec(ppc, ce)
    path = tmp_path / f"{encoder_module(spec)}.{'v' if language == 'verilog' else 'vhd'}"
    path.write_text(render_encoder(spec, language))
    return path


@pytest.mark.sim
@pytest.mark.parametrize("ppc, ce", VARIANTS)
def test_verilog_lint(ppc: int, ce: bool, tmp_path: Path, need_tool: Callable[[str], Tool],
                      need_program: Callable[[str], str]) -> None:  # fmt: skip
    tool = need_tool("verilator")
    need_program("iverilog")
    path = _write(tmp_path, ppc, ce, "verilog")
    verilator_lint(tool, path)
    iverilog_compile(path)


@pytest.mark.sim
@pytest.mark.parametrize("ppc, ce", VARIANTS)
@pytest.mark.parametrize("std", ["93", "08"])
def test_vhdl_analyses(ppc: int, ce: bool, std: str, tmp_path: Path,
                       need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    ghdl_analyse(_write(tmp_path, ppc, ce, "vhdl"), std)


@pytest.mark.parametrize("language, suffix", [("verilog", "v"), ("vhdl", "vhd")])
def test_golden(language: str, suffix: str) -> None:
    for example in ("lab_readout_640x480.yaml", "monitor_1280x720.yaml"):
        spec = synccore.load(EXAMPLES / example)
        golden_files.check(f"link/{encoder_module(spec)}.{suffix}", render_encoder(spec, language))


@pytest.mark.parametrize("ppc, ce", VARIANTS)
def test_ports_and_header(ppc: int, ce: bool) -> None:
    """The link contract's ports, in order; the mark on line 1; the latency line."""
    text = render_encoder(_spec(ppc, ce), "verilog")
    lines = text.splitlines()
    assert GENERATED_MARK in lines[0]
    assert f"// latency: {ENCODER_LATENCY} cycles" in lines
    ports = re.findall(r"^\s+(?:input|output)\s+(?:wire|reg)\s+(?:\[(\d+):0\])?\s*(\w+)", text, re.M)
    want = [("", "clk"), ("", "rst"), *([("", "ce")] if ce else []), ("", "de"), ("", "c0"),
            ("", "c1"), ("7", "d"), *([("4", "disparity_in"), ("4", "disparity_out")] if ppc > 1 else []),
            ("9", "q_out")]  # fmt: skip
    assert ports == want
    assert re.search(r"output reg\s+\[9:0\] q_out", text)
    vhdl = render_encoder(_spec(ppc, ce), "vhdl")
    assert GENERATED_MARK in vhdl.splitlines()[0] and "-- latency: 2 cycles" in vhdl.splitlines()
    assert ("disparity_in" in vhdl) == (ppc > 1) and (" ce " in vhdl) == ce


def test_tokens_come_from_the_model() -> None:
    """The token literals are the model's values, written by the context (bit 9 first)."""
    text = render_encoder(_spec(1, False), "verilog")
    for (c1, c0), word in CONTROL_TOKENS.items():
        assert f"TOKEN_{c1}{c0} = 10'b{word:010b};" in text
    vhdl = render_encoder(_spec(1, False), "vhdl")
    for (c1, c0), word in CONTROL_TOKENS.items():
        assert f'TOKEN_{c1}{c0} : std_logic_vector(9 downto 0) := "{word:010b}";' in vhdl


def test_deterministic_and_language_checked() -> None:
    spec = _spec(2, True)
    assert render_encoder(spec, "verilog") == render_encoder(spec, "verilog")
    with pytest.raises(ValueError, match="unknown language 'c'; choose from verilog, vhdl"):
        render_encoder(spec, "c")
