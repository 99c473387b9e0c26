"""The Python API: what the package exports, each function's options and errors, the docs' example.

The worked example of docs/api.md is taken from the page and run as it stands,
and its output compared with what the page says it prints, so the page cannot rot.
"""

from __future__ import annotations

import ast
import dataclasses
import importlib.util
import io
import re
import sys
from contextlib import redirect_stdout
from decimal import Decimal
from fractions import Fraction
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
import synccore.api
import synccore.verification.choosing
from synccore.cli.main import main
from tests import samples as timings
from tests.conftest import ROOT

DOC = ROOT / "docs" / "api.md"
MHZ = 1_000_000

CURATED = {
    "load", "loads", "timing", "write", "verify", "plan_clock", "plan_dvi_link", "plan_modes",
    "adjusted_spec", "adjusted_text", "find_mode", "fit", "prove", "ProofResult", "design_dac", "DacDesign",
    "Spec", "Timing", "Axis", "CoreOptions", "Outputs", "ClockPlan", "LinkPlan", "ModesPlan", "Mode",
    "Report", "verify_modes", "ModesReport",
    "SpecError", "ToolError", "Problem", "Location",
    "json_schema", "render_verilog", "render_vhdl", "__version__",
}  # fmt: skip

# The lab-readout example's own comment: 100 MHz board clock, "a clock enable every 4th cycle
# gives 25 MHz" (25 MHz pixel clock, one pixel per clock).
LAB = ROOT / "examples" / "lab_readout_640x480.yaml"


def _blocks(text: str, language: str) -> list[str]:
    return re.findall(rf"^```{language}\n(.*?)^```$", text, re.M | re.S)


def _example() -> str:
    (code,) = _blocks(DOC.read_text(encoding="utf-8"), "python")
    return code


# ------------------------------------------------------------------- the package


def test_package_exports_exactly_the_curated_api() -> None:
    assert set(synccore.__all__) == CURATED
    assert len(synccore.__all__) == len(CURATED)
    assert set(synccore.api.__all__) == CURATED
    for name in CURATED:
        assert getattr(synccore, name) is getattr(synccore.api, name), name
    assert "docs/api.md" in (synccore.__doc__ or "")


def test_functions_do_not_collide_with_subpackages() -> None:
    import synccore.model
    import synccore.spec
    import synccore.timings
    import synccore.verification

    for name in ("load", "loads", "timing", "write", "verify", "plan_clock", "find_mode"):
        assert callable(getattr(synccore, name)) and not isinstance(getattr(synccore, name),
                                                                     type(sys)), name  # fmt: skip
    assert synccore.verification is sys.modules["synccore.verification"]
    assert synccore.timings is sys.modules["synccore.timings"]


def test_tool_error_is_one_line() -> None:
    err = synccore.ToolError("unknown FPGA family 'x'; choose from ice40", subject="family")
    assert str(err) == "family: unknown FPGA family 'x'; choose from ice40"
    assert (err.subject, err.message) == ("family", "unknown FPGA family 'x'; choose from ice40")
    assert str(synccore.ToolError("no engine found")) == "no engine found"
    assert not issubclass(synccore.ToolError, synccore.SpecError)


# ------------------------------------------------------------------- docs/api.md


def test_docs_example_uses_only_the_api() -> None:
    """Tool-free: the example parses and every ``synccore.X`` it uses is exported."""
    tree = ast.parse(_example())
    used = {node.attr for node in ast.walk(tree)
            if isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name)
            and node.value.id == "synccore"}  # fmt: skip
    assert {"load", "timing", "write", "plan_clock", "find_mode", "verify"} <= used
    assert used <= CURATED
    imports = {a.name for node in ast.walk(tree) if isinstance(node, ast.Import) for a in node.names}
    assert imports <= {"synccore", "tempfile"}
    assert 12 <= len(_example().splitlines()) <= 20


@pytest.mark.sim  # the built-in engine simulates two 640x480 frames: about half a minute
def test_docs_example_runs_and_prints_what_the_page_says(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(ROOT)
    out = io.StringIO()
    with redirect_stdout(out):
        exec(compile(_example(), str(DOC), "exec"), {"__name__": "__docs__"})
    text = DOC.read_text(encoding="utf-8")
    printed = text[text.index("It prints:"):]
    assert out.getvalue() == _blocks(printed, "")[0]
    lines = out.getvalue().splitlines()
    # 640x480 frame totals 800 x 525 (VESA DMT 640x480@60, from memory); 25 MHz / 800 px
    assert lines[0].startswith("lab_readout: 800 x 525 pixels, line rate 31.250 kHz")
    # 1280x720@60 is DMT ID 55h at 74.25 MHz (VESA DMT; the same timing as CTA-861 VIC 4)
    assert lines[3] == "1280x720@60 is DMT 55h: 74.25 MHz"
    assert lines[4] == "builtin engine: every figure matches"


# ------------------------------------------------------------------- load, loads, timing


def test_load_and_loads() -> None:
    spec = synccore.load(LAB)
    assert (spec.name, spec.source, spec.pixel_clock_hz) == ("lab_readout", str(LAB), 25 * MHZ)
    assert synccore.loads(LAB.read_text(), "lab.yaml") == dataclasses.replace(spec, source="lab.yaml")
    assert synccore.loads(timings.SMALL).source == "<string>"


def test_loads_reports_every_problem_located() -> None:
    bad = timings.SMALL.replace("sync: 4", "sync: 0").replace("active: 8", "active: x")
    with pytest.raises(synccore.SpecError) as err:
        synccore.loads(bad, "mine.yaml")
    assert str(err.value).splitlines() == [
        "mine.yaml:3:48: horizontal.sync: must be ≥ 1, got 0",
        "mine.yaml:4:20: vertical.active: must be a whole number, got 'x'",
    ]
    assert [p.location for p in err.value.problems] == [
        synccore.Location("mine.yaml", 3, 48), synccore.Location("mine.yaml", 4, 20)]  # fmt: skip


def test_load_missing_file(tmp_path: Path) -> None:
    with pytest.raises(synccore.SpecError, match=r"nope\.yaml: cannot read: No such file"):
        synccore.load(tmp_path / "nope.yaml")


def test_timing_figures() -> None:
    t = synccore.timing(synccore.loads(timings.DMT_640x480))
    assert isinstance(t, synccore.Timing)
    # VESA DMT ID 04h: totals 800 x 525, line rate 31.469 kHz, refresh 59.940 Hz (from memory)
    assert (t.h_total, t.v_total) == (800, 525)
    assert round(float(t.line_rate_hz)) == 31469
    assert round(float(t.refresh_hz), 3) == 59.940
    assert isinstance(t.outputs_at(0), synccore.Outputs)


# ------------------------------------------------------------------- write


def _names(paths: list[Path]) -> list[str]:
    return sorted(p.name for p in paths)


def test_write_core(tmp_path: Path) -> None:
    spec = synccore.loads(timings.SMALL)
    written = synccore.write(spec, tmp_path / "out")
    assert _names(written) == ["small_mode.v", "small_mode.vhd"]
    assert _names(list((tmp_path / "out").iterdir())) == [".synccore-manifest.json", *_names(written)]
    assert (tmp_path / "out" / "small_mode.v").read_text() == synccore.render_verilog(spec)
    assert (tmp_path / "out" / "small_mode.vhd").read_text() == synccore.render_vhdl(spec)


def test_write_testbench_and_pattern(tmp_path: Path) -> None:
    spec = synccore.loads(timings.DMT_640x480)
    written = synccore.write(spec, str(tmp_path), testbench=True, pattern="grid")
    assert _names(written) == [
        "dmt_640x480.v", "dmt_640x480.vhd", "dmt_640x480_pattern.v", "dmt_640x480_pattern.vhd",
        "dmt_640x480_tb.v", "dmt_640x480_tb.vhd", "dmt_640x480_top.v", "dmt_640x480_top.vhd"]  # fmt: skip
    assert all(isinstance(p, Path) and p.is_file() for p in written)


def test_write_options_are_keyword_only(tmp_path: Path) -> None:
    spec = synccore.loads(timings.SMALL)
    with pytest.raises(TypeError):
        synccore.write(spec, tmp_path, True)  # type: ignore[misc]
    assert list(tmp_path.iterdir()) == []


def test_write_unknown_pattern(tmp_path: Path) -> None:
    with pytest.raises(ValueError, match=r"^unknown pattern 'stripes'; choose from bars, grid, "
                                         r"gradient, checker, edges$"):  # fmt: skip
        synccore.write(synccore.loads(timings.DMT_640x480), tmp_path / "out", pattern="stripes")
    assert not (tmp_path / "out").exists()


def test_write_pattern_the_spec_cannot_have(tmp_path: Path) -> None:
    spec = synccore.loads(timings.TINY, "tiny.yaml")
    with pytest.raises(synccore.SpecError) as err:
        synccore.write(spec, tmp_path / "out", pattern="bars")
    assert str(err.value).splitlines() == [  # both axes, reported at once, located
        "tiny.yaml:3:22: horizontal.active: must be ≥ 32 for the test-pattern design, got 1",
        "tiny.yaml:4:20: vertical.active: must be ≥ 32 for the test-pattern design, got 1",
    ]
    assert not (tmp_path / "out").exists()


def test_write_clock(tmp_path: Path) -> None:
    spec = synccore.loads(timings.DMT_640x480)
    plan = synccore.plan_clock(spec, "12 MHz", "ice40")
    written = synccore.write(spec, tmp_path / "ice40", clock=plan)
    assert _names(written) == ["dmt_640x480.v", "dmt_640x480.vhd", "dmt_640x480_clock.sdc",
                               "dmt_640x480_clock.v", "dmt_640x480_clock.vhd"]  # fmt: skip
    # SB_PLL40_CORE is the iCE40 PLL primitive (Lattice TN1251)
    assert "SB_PLL40_CORE" in (tmp_path / "ice40" / "dmt_640x480_clock.v").read_text()
    xilinx = synccore.plan_clock(spec, 100 * MHZ, "xc7-mmcm")
    assert "dmt_640x480_clock.xdc" in _names(synccore.write(spec, tmp_path / "x", clock=xilinx))


def test_write_clock_enable_route_needs_the_ce_input(tmp_path: Path) -> None:
    spec = synccore.loads(timings.DMT_640x480)
    plan = synccore.plan_clock(spec, "100 MHz", None)
    with pytest.raises(synccore.SpecError) as err:
        synccore.write(spec, tmp_path / "out", clock=plan)
    # 100 MHz / 25.175 MHz is 3.97: a ce every 4 cycles
    # located at the spec (no core section: its first line)
    assert str(err.value) == ("<string>:1:1: core.clock_enable: must be true for the clock-enable "
                              "route (ce every 4 cycles of 100.000 MHz), got false")  # fmt: skip
    assert not (tmp_path / "out").exists()
    with_ce = synccore.loads(timings.DMT_640x480 + "core: {clock_enable: true}\n")
    # 25.000 MHz is 0.7 % slow (outside VESA DMT's ±0.5 %, from memory): accepted knowingly
    written = synccore.write(with_ce, tmp_path / "out", accept_clock_error=True,
                             clock=synccore.plan_clock(with_ce, "100 MHz", None))  # fmt: skip
    assert "dmt_640x480_clock.v" in _names(written)


def test_write_refuses_a_plan_without_setting_or_for_another_spec(tmp_path: Path) -> None:
    spec = synccore.loads(timings.DMT_640x480)
    # PLLE2 input at least 19 MHz (CLKIN_FREQ_MIN in Xilinx's unisim model PLLE2_ADV.v)
    none = synccore.plan_clock(spec, "12 MHz", "xc7-pll", strict=False)
    with pytest.raises(synccore.ToolError, match=r"^no PLL setting of xc7-pll reaches"):
        synccore.write(spec, tmp_path / "out", clock=none)
    other = synccore.plan_clock(synccore.loads(timings.DMT_800x600), "12 MHz", "ice40")
    with pytest.raises(ValueError, match=r"^the clock plan was made for the spec 'dmt_800x600'"):
        synccore.write(spec, tmp_path / "out", clock=other)
    assert not (tmp_path / "out").exists()


def test_write_all_or_nothing_and_force(tmp_path: Path) -> None:
    spec = synccore.loads(timings.SMALL)
    mine = tmp_path / "small_mode.vhd"
    mine.write_text("-- my own file\n")
    with pytest.raises(synccore.SpecError, match=r"small_mode\.vhd: exists and was not written by synccore"):
        synccore.write(spec, tmp_path, testbench=True)
    assert _names(list(tmp_path.iterdir())) == ["small_mode.vhd"]  # nothing half-written
    assert mine.read_text() == "-- my own file\n"
    synccore.write(spec, tmp_path, force=True)
    assert mine.read_text() == synccore.render_vhdl(spec)
    synccore.write(spec, tmp_path)  # a file synccore generated is replaced without force
    (tmp_path / "small_mode.v").write_text("// edited by hand\n")
    edited = r"small_mode\.v: exists and was not written by synccore \(or was changed since\)"
    with pytest.raises(synccore.SpecError, match=edited):
        synccore.write(spec, tmp_path)  # ... but not once the user has edited it


# ------------------------------------------------------------------- plan_clock


@pytest.mark.parametrize("board", [100 * MHZ, 1e8, Fraction(10**8), Decimal("100e6"),
                                   "100 MHz", "100MHz", "0.1 GHz"])  # fmt: skip
def test_plan_clock_takes_numbers_and_units(board: object) -> None:
    plan = synccore.plan_clock(synccore.load(LAB), board, None)  # type: ignore[arg-type]
    assert isinstance(plan, synccore.ClockPlan)
    assert plan.f_board == 100 * MHZ and plan.family is None
    assert plan.enable is not None and plan.enable.divide == 4 and plan.within_tolerance


def test_plan_clock_through_a_pll() -> None:
    spec = synccore.loads(timings.DMT_640x480)
    plan = synccore.plan_clock(spec, "12 MHz", "ice40")
    assert plan.family is not None and plan.family.key == "ice40" and plan.best is not None
    # within the ±0.5 % pixel clock tolerance of VESA DMT (from memory)
    assert abs(plan.best.f_out - Fraction(25_175_000)) <= Fraction(25_175_000) / 200


@pytest.mark.parametrize("board", ["fast", "", 0, -12 * MHZ, float("inf"), float("nan"),
                                   Decimal("NaN"), True, None, [12]])  # fmt: skip
def test_plan_clock_bad_board_clock(board: object) -> None:
    with pytest.raises(synccore.ToolError) as err:
        synccore.plan_clock(synccore.load(LAB), board, None)  # type: ignore[arg-type]
    assert err.value.subject == "board_clock_hz"
    assert str(err.value) == (f'board_clock_hz: must be a frequency like "12MHz" or "27 MHz", '
                              f"got {board!r}")  # fmt: skip


@pytest.mark.parametrize("family", ["spartan", "ICE40", 40])
def test_plan_clock_unknown_family(family: object) -> None:
    with pytest.raises(synccore.ToolError) as err:
        synccore.plan_clock(synccore.load(LAB), "12 MHz", family)  # type: ignore[arg-type]
    assert str(err.value) == (f"family: unknown FPGA family {family!r}; choose from ice40, ecp5, "
                              "xc7-mmcm, xc7-pll, gowin, cyclone")  # fmt: skip


def test_plan_clock_without_a_setting() -> None:
    spec = synccore.loads(timings.DMT_640x480)
    # PLLE2 input at least 19 MHz (CLKIN_FREQ_MIN in Xilinx's unisim model PLLE2_ADV.v)
    with pytest.raises(synccore.ToolError) as err:
        synccore.plan_clock(spec, "12 MHz", "xc7-pll")
    assert str(err.value) == "no PLL setting of xc7-pll reaches 25.175 MHz from 12.000 MHz"
    plan = synccore.plan_clock(spec, "12 MHz", "xc7-pll", strict=False)
    assert plan.best is None and not plan.within_tolerance
    with pytest.raises(TypeError):
        synccore.plan_clock(spec, "12 MHz", "xc7-pll", False)  # type: ignore[misc]


# ------------------------------------------------------------------- find_mode


@pytest.mark.parametrize("name", ["1280x720@60", "DMT 0x55", "CTA VIC 4", "1280x720@60 cta"])
def test_find_mode(name: str) -> None:
    mode = synccore.find_mode(name)
    assert isinstance(mode, synccore.Mode)
    # CTA-861 VIC 4 and VESA DMT ID 55h, 1280x720 at 60 Hz: 74.25 MHz, 1280 110 40 220 /
    # 720 5 5 20 (from memory)
    assert mode.pixel_clock_hz == 74_250_000
    h, v = mode.horizontal, mode.vertical
    assert (h.active, h.front_porch, h.sync, h.back_porch) == (1280, 110, 40, 220)
    assert (v.active, v.front_porch, v.sync, v.back_porch) == (720, 5, 5, 20)


def test_find_mode_errors() -> None:
    with pytest.raises(ValueError, match=r"^name: no library entry is 1280x721@60, "):
        synccore.find_mode("1280x721@60")
    # 1920x1080 at 60 Hz is both DMT ID 52h and CTA-861 VIC 16 (from memory); the library
    # gives the two different sync polarities, so the bare name is ambiguous
    with pytest.raises(ValueError, match=r"^name: is ambiguous: it matches DMT 52h, CTA VIC 16;"):
        synccore.find_mode("1920x1080@60")
    with pytest.raises(ValueError, match=r"^name: must name a mode like '1280x720@60'"):
        synccore.find_mode("720p")
    with pytest.raises(TypeError):
        synccore.find_mode(55)  # type: ignore[arg-type]


# ------------------------------------------------------------------- verify


def test_verify_builtin(tmp_path: Path) -> None:
    spec = synccore.loads(timings.SMALL)
    seen: list[tuple[str, int]] = []
    report = synccore.verify(spec, engines=["builtin"], frames=3, waves=True,
                             work_dir=tmp_path, progress=lambda e, n: seen.append((e, n)))  # fmt: skip
    assert isinstance(report, synccore.Report) and report.ok, report.problems()
    assert [r.engine for r in report.runs] == ["builtin"]
    rows = {row.key: row for row in report.rows}
    # SMALL's own numbers: 20 + 3 + 4 + 5 = 32 pixels a line, 8 + 2 + 2 + 3 = 15 lines
    assert (rows["line_total"].want, rows["line_total"].got) == (32, {"builtin": "32"})
    assert (rows["frame_total"].want, rows["frame_total"].got) == (15, {"builtin": "15"})
    assert seen[-1] == ("builtin", 3)
    (wave,) = report.runs[0].waves
    assert wave.is_relative_to(tmp_path) and wave.stat().st_size > 0


def test_verify_options_and_errors() -> None:
    spec = synccore.loads(timings.TINY)
    with pytest.raises(TypeError):
        synccore.verify(spec, ["builtin"])  # type: ignore[misc]
    with pytest.raises(TypeError, match=r"^engines must be a list of names, like \['builtin'\]"):
        synccore.verify(spec, engines="builtin")
    with pytest.raises(synccore.ToolError) as err:
        synccore.verify(spec, engines=["modelsim"])
    assert str(err.value) == "unknown engine 'modelsim'; choose from icarus, ghdl, verilator, builtin"
    with pytest.raises(synccore.ToolError, match=r"^no engine named; choose from icarus"):
        synccore.verify(spec, engines=[])
    with pytest.raises(ValueError, match=r"^frames must be a whole number of at least 2, got 1$"):
        synccore.verify(spec, engines=["builtin"], frames=1)


def _hint(engine: str) -> str:
    if importlib.util.find_spec("cocotb_tools") is None:
        return "the simulators run through cocotb: pip install 'synccore[sim]'"
    return {"icarus": "install Debian's package 'iverilog' (apt-get install iverilog)",
            "ghdl": "install Debian's package 'ghdl' (apt-get install ghdl)"}[engine]  # fmt: skip


def test_verify_missing_simulators(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("PATH", str(tmp_path))  # an empty folder: no iverilog, vvp or ghdl on it
    spec = synccore.loads(timings.TINY)
    with pytest.raises(synccore.ToolError) as err:
        synccore.verify(spec, engines=["icarus", "builtin", "ghdl"])
    assert str(err.value) == (f"engine 'icarus' not found: {_hint('icarus')}; "
                              f"engine 'ghdl' not found: {_hint('ghdl')}")  # fmt: skip
    chosen = synccore.verification.choosing.pick_engines(None)
    assert "icarus" not in chosen and "ghdl" not in chosen
    assert ("builtin" in chosen) == (chosen == ["builtin"])  # builtin only when no simulator


def test_default_engines_prefer_the_simulators() -> None:
    chosen = synccore.verification.choosing.pick_engines(None)
    assert chosen and set(chosen) <= {"icarus", "ghdl", "verilator", "builtin"}
    assert ("builtin" in chosen) == (chosen == ["builtin"])


# ------------------------------------------------------------------- the command line's use


def test_cli_prints_a_tool_error_as_one_line(tmp_path: Path, write_spec,  # type: ignore[no-untyped-def]
                                             monkeypatch: pytest.MonkeyPatch) -> None:  # fmt: skip
    path = write_spec(timings.SMALL)
    monkeypatch.setenv("PATH", str(tmp_path / "empty"))
    result = CliRunner().invoke(main, ["verify", str(path), "--sim", "icarus"])
    assert result.exit_code == 2
    assert result.stderr == f"engine 'icarus' not found: {_hint('icarus')}\n"
    assert "Traceback" not in result.output


def test_cli_build_clock_without_a_setting(tmp_path: Path, write_spec) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "out"
    spec = str(write_spec(timings.DMT_640x480))
    result = CliRunner().invoke(main, ["build", spec, "-o", str(out), "--clock",
                                       "--board-clock", "12MHz", "--family", "xc7-pll"])  # fmt: skip
    assert result.exit_code == 2 and not out.exists()
    assert result.stderr == ("--clock: no PLL setting of xc7-pll reaches 25.175 MHz from "
                             "12.000 MHz; run 'synccore clock' for details\n")  # fmt: skip


# ------------------------------------------------------ clock advice, applied

# VESA DMT 800x600@60 (DMT 09h, the library's entry from the table as reproduced in the Linux
# kernel's drm_dmt_modes[]): 40.000 MHz. iCE40 from 12 MHz reaches 39.75 MHz at best
# (12 MHz * 53 / 16, TN1251 from memory): -0.625 %, outside VESA DMT's ±0.5 % (from memory).
SVGA_ICE40 = "name: svga\nstandard: DMT 09h\ncore: {lead: 1}\nports: {prefix: p_}\n"


def test_write_refuses_a_plan_outside_the_tolerance(tmp_path: Path) -> None:
    spec = synccore.loads(SVGA_ICE40, "svga.yaml")
    plan = synccore.plan_clock(spec, "12 MHz", "ice40")
    assert not plan.within_tolerance
    with pytest.raises(synccore.ToolError) as err:
        synccore.write(spec, tmp_path / "out", clock=plan)
    assert str(err.value) == (
        "the clock plan misses: the clock reached, 39.750 MHz, is -0.625 % from the pixel clock "
        "40.000 MHz, outside +/-0.5 %, VESA DMT (from memory); apply its adjustment "
        "(synccore.adjusted_spec(plan)), plan that spec and write it, or pass "
        "accept_clock_error=True")
    assert not (tmp_path / "out").exists()
    written = synccore.write(spec, tmp_path / "out", clock=plan, accept_clock_error=True)
    assert "svga_clock.v" in _names(written)


def test_adjusted_spec_and_text(tmp_path: Path) -> None:
    spec = synccore.loads(SVGA_ICE40, "svga.yaml")
    plan = synccore.plan_clock(spec, "12 MHz", "ice40")
    adjusted = synccore.adjusted_spec(plan)
    assert adjusted.pixel_clock_hz == Fraction(12 * MHZ) * 53 / 16
    assert (adjusted.name, adjusted.core, adjusted.port_prefix) == ("svga", spec.core, "p_")
    # the written description reads back as the same spec
    text = synccore.adjusted_text(plan, command="make it")
    assert synccore.loads(text, "svga.yaml") == adjusted
    assert "# Build it with: make it\n" in text
    again = synccore.plan_clock(adjusted, "12 MHz", "ice40")
    assert again.within_tolerance and again.adjustment is None
    synccore.write(adjusted, tmp_path / "out", clock=again)
    with pytest.raises(synccore.ToolError, match=r"^nothing to adjust: the clock reached"):
        synccore.adjusted_spec(again)
    with pytest.raises(synccore.ToolError, match=r"^nothing to adjust"):
        synccore.adjusted_text(again)


def test_a_fitted_spec_keeps_its_ranges_through_to_dict() -> None:
    from synccore.spec import from_dict, to_dict

    spec = synccore.load(ROOT / "examples" / "panel_ranges.yaml")
    assert spec.fit is not None
    # the example's own datasheet figures
    assert spec.fit.range_of("horizontal.front_porch") is not None
    r = spec.fit.range_of("horizontal.front_porch")
    assert r is not None and (r.min, r.typ, r.max) == (24, 96, 240)
    assert spec.fit.range_of("horizontal.back_porch") is None  # given as one number: fixed
    assert spec.fit.tolerance is None  # left to the default
    again = from_dict(to_dict(spec))
    assert again.fit == spec.fit and hash(again.fit) == hash(spec.fit)


def test_verify_modes_judges_every_frame_on_each_engine(tmp_path: Path) -> None:
    """The API's multi-mode verification: 20 seeded changes among 3 small modes (made up)."""
    spec = synccore.loads(timings.MULTI_SMALL, "small.yaml")
    found = synccore.verification.choosing.available_engines()
    engines = [e for e in ("icarus", "builtin") if e in found]
    if not engines:
        pytest.skip("neither Icarus nor Amaranth here")
    report = synccore.verify_modes(spec, engines=engines, changes=20, seed=5, work_dir=tmp_path)
    assert report.ok, report.problems()
    assert report.problems() == [] and report.bench == "cycles"
    for run in report.runs.values():
        assert len(run.changes) == 20
        assert {f["mode"] for f in run.frames} == {0, 1, 2}
    with pytest.raises(synccore.ToolError, match="verify_modes"):
        synccore.verify(spec)
    with pytest.raises(ValueError, match="multi-mode spec"):
        synccore.verify_modes(synccore.loads(timings.DMT_640x480))
    with pytest.raises(ValueError, match="at least 1"):
        synccore.verify_modes(spec, changes=0)
