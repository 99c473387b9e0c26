"""Emitted cores compile and lint clean in the real tools, for many timings."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import EXAMPLES
from tests.hdl import ghdl_analyse, iverilog_compile, verilator_lint

pytestmark = pytest.mark.sim

CASES = {
    "dmt_640x480": timings.DMT_640x480,
    "dmt_800x600": timings.DMT_800x600,
    "cta_720p": timings.CTA_720P,
    "cta_1080p": timings.CTA_1080P,
    "tiny": timings.TINY,
    "huge": timings.HUGE,
    "no_back_porch": timings.NO_BACK_PORCH,
    "small_opts": timings.SMALL_ALL_OPTIONS,
    "scaled": timings.SCALED,
    "scaled_ppc": timings.SCALED_PPC,
    **{p.stem: p.read_text() for p in EXAMPLES},
}
RESET_STYLES = ["sync_high", "sync_low", "async_high", "async_low"]


def _variants() -> list[tuple[str, str]]:
    out = list(CASES.items())
    for style in RESET_STYLES:
        text = timings.spec_text(f"reset_{style}", "10 MHz", (8, 2, 2, 2, "positive"),
                                 (4, 1, 1, 1, "negative"),
                                 core={"reset": style, "clock_enable": True, "lead": 5})  # fmt: skip
        out.append((f"reset_{style}", text))
    for ppc in (2, 4, 8):
        text = timings.spec_text(f"ppc_{ppc}", "10 MHz", (ppc, ppc, ppc, 0, "negative"),
                                 (2, 0, 1, 0, "positive"), core={"pixels_per_clock": ppc})  # fmt: skip
        out.append((f"ppc{ppc}_one_cycle_active", text))
    return out


VARIANTS = _variants()


def _emit(text: str, tmp_path: Path, suffix: str) -> Path:
    spec = synccore.loads(text, "case.yaml")
    render = synccore.render_verilog if suffix == ".v" else synccore.render_vhdl
    path = tmp_path / (spec.name + suffix)
    path.write_text(render(spec))
    return path


@pytest.mark.parametrize("text", [t for _, t in VARIANTS], ids=[n for n, _ in VARIANTS])
def test_verilog_lints_clean(text: str, tmp_path: Path, need_tool: Callable[[str], Tool],
                             need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("iverilog")
    verilator = need_tool("verilator")
    source = _emit(text, tmp_path, ".v")
    iverilog_compile(source)
    verilator_lint(verilator, source)


@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize("text", [t for _, t in VARIANTS], ids=[n for n, _ in VARIANTS])
def test_vhdl_analyses_clean(text: str, std: str, tmp_path: Path,
                             need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    ghdl_analyse(_emit(text, tmp_path, ".vhd"), std)


def test_lint_catches_a_broken_core(tmp_path: Path, need_tool: Callable[[str], Tool]) -> None:
    """The lint check is not vacuous: a width mismatch in the text is reported."""
    verilator = need_tool("verilator")
    source = _emit(timings.SMALL, tmp_path, ".v")
    source.write_text(source.read_text().replace("h_pos <= h_pos + 1'b1;", "h_pos <= 1'b1;"))
    with pytest.raises(AssertionError, match="WIDTH"):
        verilator_lint(verilator, source)
