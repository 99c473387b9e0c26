"""Emitted cores compile and lint clean in the real tools, for many timings."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

import synccore
from synccore.emit.files import core_artifacts, pattern_artifacts
from synccore.model.pattern import PATTERNS
from synccore.verification.tools import Tool
from tests import samples as timings
from tests.conftest import EXAMPLES, MULTI_MODE_EXAMPLES
from tests.hdl import GHDL_WARNINGS, ghdl_analyse, iverilog_compile, run, verilator_lint

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
    "cta_1080i": timings.CTA_1080I,
    "small_interlaced": timings.SMALL_INTERLACED,
    "small_interlaced_opts": timings.SMALL_INTERLACED_OPTS,
    **{p.stem: p.read_text() for p in EXAMPLES},
    # multi-mode cores (modes:): every option they have, 2, 3 and 16 modes
    "multi_small": timings.MULTI_SMALL,
    "multi_small_opts": timings.MULTI_SMALL_OPTS,
    "multi_two": timings.MULTI_TWO,
    "multi_sixteen": timings.MULTI_SIXTEEN,
    **{p.stem: p.read_text() for p in MULTI_MODE_EXAMPLES},
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


# The first-light design (core + pattern generator + top level) at several pixels per clock:
# every pattern, and the lanes with scale, lead, clock enable and a port prefix.
def _wide_first_light(ppc: int, core: dict[str, object], name: str) -> str:
    return timings.spec_text(name, "10 MHz", (64, 8, 8, 8, "positive"), (40, 1, 1, 1, "negative"),
                             core={"pixels_per_clock": ppc, **core})  # fmt: skip


WIDE_FIRST_LIGHT = {
    "ppc2": _wide_first_light(2, {}, "fl_ppc2"),
    "ppc4_lead3_ce": _wide_first_light(4, {"lead": 3, "clock_enable": True}, "fl_ppc4"),
    "ppc8_lead0_async_low": _wide_first_light(8, {"lead": 0, "reset": "async_low"}, "fl_ppc8")
    + "color: {red: 8, green: 6, blue: 5}\n",
    "ppc4_scale2": _wide_first_light(4, {"scale": 2, "lead": 1}, "fl_ppc4_s2").replace("active: 40",
                                                                                       "active: 64"),
    "ppc2_scale4": _wide_first_light(2, {"scale": 4, "lead": 1}, "fl_ppc2_s4")
    .replace("active: 64", "active: 128").replace("active: 40", "active: 128"),
    # interlaced: the top leaves the core's field port unused (y already holds the field)
    "interlaced": _wide_first_light(1, {}, "fl_il") + "interlaced: true\n",
    "interlaced_ppc2_ce": _wide_first_light(2, {"clock_enable": True}, "fl_il_ppc2") + "interlaced: true\n",
}
WIDE_CASES = [(case, pattern) for case in WIDE_FIRST_LIGHT for pattern in PATTERNS]


def _emit_first_light(text: str, pattern: str, tmp_path: Path, suffix: str) -> list[str]:
    spec = synccore.loads(text, "case.yaml")
    names = []
    for a in core_artifacts(spec) + pattern_artifacts(spec, pattern):  # core, pattern, top
        if a.name.endswith(suffix):
            (tmp_path / a.name).write_text(a.text)
            names.append(a.name)
    return names


@pytest.mark.parametrize("case, pattern", WIDE_CASES, ids=[f"{c}-{p}" for c, p in WIDE_CASES])
def test_first_light_verilog_lints_clean_at_several_pixels_per_clock(
    case: str, pattern: str, tmp_path: Path, need_tool: Callable[[str], Tool],
    need_program: Callable[[str], str],
) -> None:  # fmt: skip
    need_program("iverilog")
    verilator = need_tool("verilator")
    names = _emit_first_light(WIDE_FIRST_LIGHT[case], pattern, tmp_path, ".v")
    top = names[-1][: -len(".v")]
    run(["verilator", "--lint-only", "-Wall", "--top-module", top, *names], tmp_path, verilator.env)
    out = run(["iverilog", "-g2001", "-Wall", "-o", "/dev/null", *names], tmp_path)
    assert "warning" not in out.lower(), out


@pytest.mark.parametrize("case, pattern", WIDE_CASES, ids=[f"{c}-{p}" for c, p in WIDE_CASES])
def test_first_light_vhdl_analyses_clean_at_several_pixels_per_clock(
    case: str, pattern: str, tmp_path: Path, need_program: Callable[[str], str]
) -> None:  # fmt: skip
    need_program("ghdl")
    names = _emit_first_light(WIDE_FIRST_LIGHT[case], pattern, tmp_path, ".vhd")
    for std in ("93", "08"):
        (tmp_path / f"w{std}").mkdir()
        run(["ghdl", "-a", f"--std={std}", f"--workdir=w{std}", *GHDL_WARNINGS, "-Werror", *names],
            tmp_path)  # fmt: skip
