"""The board top's files: which are written, the pin files' placeholders and clock lines,
the SDC's periods and names, and golden text for the three jobs."""

from __future__ import annotations

import re
from fractions import Fraction
from pathlib import Path

import pytest
from click.testing import CliRunner

import synccore
from synccore.cli import main
from synccore.clocking import FAMILIES, FAMILY_KEYS
from synccore.clocking.plan import ClockPlan, make_plan
from synccore.emit.first_light.board import bit_pins, build_board_context
from synccore.emit.first_light.board_pins import PLACEHOLDER
from tests import golden_files
from tests.emit.test_clock_hdl import DMT_640
from tests.first_light.jobs import JOBS, VGA_800x600, plan_of

SUFFIX = {"ice40": ".pcf", "ecp5": ".lpf", "gowin": ".cst", "xc7-mmcm": ".xdc",
          "xc7-pll": ".xdc", "cyclone": ".qsf"}  # fmt: skip
# how each format comments a line and writes one pin's location (the vendors' constraint
# file references, from memory)
COMMENT = {".pcf": "#", ".lpf": "#", ".cst": "//", ".xdc": "#", ".qsf": "#"}
LOCATION = {
    ".pcf": r"set_io (?:-pullup yes )?(\S+) " + PLACEHOLDER,
    ".lpf": r'LOCATE COMP "(\S+)" SITE "' + PLACEHOLDER + '";',
    ".cst": r'IO_LOC "(\S+)" ' + PLACEHOLDER + ";",
    ".xdc": r"set_property PACKAGE_PIN " + PLACEHOLDER + r" \[get_ports \{(\S+)\}\]",
    ".qsf": r"set_location_assignment " + PLACEHOLDER + r" -to (\S+)",
}


# These tests are about which files a board top brings; how close the clock comes is judged
# elsewhere (tests/clocking, tests/cli/test_clock_cli.py), so they accept any plan's error.
def _plan(key: str | None, mhz: int = 27, text: str = DMT_640) -> ClockPlan:
    spec = synccore.loads(text, "vga.yaml")
    return make_plan(spec, f_board=Fraction(mhz * 10**6), family=FAMILIES[key] if key else None)


def _names(paths: list[Path]) -> set[str]:
    return {p.name for p in paths}


@pytest.mark.parametrize("key", FAMILY_KEYS)
def test_pattern_and_clock_add_the_board_top_and_its_pin_file(tmp_path: Path, key: str) -> None:
    plan = _plan(key)
    names = _names(synccore.write(plan.spec, tmp_path, pattern="bars", clock=plan, accept_clock_error=True))
    board = {"vga_board.v", "vga_board.vhd", "vga_board" + SUFFIX[key]}
    if SUFFIX[key] != ".xdc":
        board.add("vga_board.sdc")  # the 7 series' .xdc carries the timing itself
    assert board <= names
    assert not {n for n in names if n.startswith("vga_board")} - board


def test_the_board_top_needs_both_the_pattern_and_the_clock(tmp_path: Path) -> None:
    plan = _plan("ice40")
    with_clock = _names(synccore.write(plan.spec, tmp_path / "a", clock=plan, accept_clock_error=True))
    with_pattern = _names(synccore.write(plan.spec, tmp_path / "b", pattern="bars"))
    assert not any("_board" in n for n in with_clock | with_pattern)


def test_the_clock_enable_route_has_a_board_top_and_timing_but_no_pin_file(tmp_path: Path) -> None:
    plan = _plan(None, 100)
    names = _names(synccore.write(plan.spec, tmp_path, pattern="bars", clock=plan, accept_clock_error=True))
    assert {n for n in names if "_board" in n} == {"vga_board.v", "vga_board.vhd", "vga_board.sdc"}
    sdc = (tmp_path / "vga_board.sdc").read_text()
    # 100 MHz: a 10 ns period (common practice); no PLL, so no second clock
    assert re.findall(r"^create_clock .*$", sdc, re.M) == [
        "create_clock -name board_clk -period 10.000 [get_ports {board_clk}]"]


@pytest.mark.parametrize("key", FAMILY_KEYS)
def test_every_pin_is_a_placeholder_with_a_comment_above(key: str) -> None:
    from synccore.emit.first_light.board_pins import render_pins

    plan = _plan(key)
    text = render_pins(plan, "bars")
    suffix = SUFFIX[key]
    lines = text.splitlines()
    located = []
    for i, line in enumerate(lines):
        found = re.fullmatch(LOCATION[suffix], line)
        if found:
            located.append(found.group(1))
            assert lines[i - 1].startswith(COMMENT[suffix] + f" {found.group(1)}: "), lines[i - 1]
    expected = [p.name for p in bit_pins(build_board_context(plan, "bars"))]
    # DMT_640 has 4 bits per colour (the spec's default): clock, reset, 3 syncs, 12 colour bits
    assert len(expected) == 17
    assert located == expected
    # no placeholder outside the location lines and the instructions
    assert sum(PLACEHOLDER in line and not line.startswith(COMMENT[suffix]) for line in lines) == 17


def test_the_clock_frequency_lines_the_open_tools_read() -> None:
    from synccore.emit.first_light.board_pins import render_pins

    ice40 = render_pins(plan_of(JOBS["ice40_hx8k_vga800"]), "bars")
    ecp5 = render_pins(plan_of(JOBS["ecp5_25k_hd720"]), "bars")
    xc7 = render_pins(_plan("xc7-mmcm", 100), "bars")
    # the board oscillators of the jobs (12 MHz, 25 MHz); 100 MHz is a 10 ns period
    assert "\nset_frequency board_clk 12\n" in ice40
    assert '\nFREQUENCY PORT "board_clk" 25 MHZ;\n' in ecp5
    assert "\ncreate_clock -period 10.000 -name board_clk [get_ports {board_clk}]\n" in xc7
    assert "\nset_io -pullup yes reset_n TODO_PIN\n" in ice40
    assert '\nIOBUF PORT "reset_n" IO_TYPE=LVCMOS33 PULLMODE=UP;\n' in ecp5


def test_the_sdc_names_the_board_tops_port_and_the_pll_net(tmp_path: Path) -> None:
    plan = plan_of(JOBS["ice40_hx8k_vga800"])
    synccore.write(plan.spec, tmp_path, pattern="bars", clock=plan, accept_clock_error=True)
    sdc = (tmp_path / "vga800_board.sdc").read_text()
    # 12 MHz: 83.333 ns; 40.5 MHz: 24.691 ns (1 / f, common practice)
    assert re.findall(r"^create_clock .*$", sdc, re.M) == [
        "create_clock -name board_clk -period 83.333 [get_ports {board_clk}]",
        "create_clock -name pixel_clk -period 24.691 [get_nets {pixel_clk}]",
    ]
    board = (tmp_path / "vga800_board.v").read_text()
    assert "input  wire        board_clk," in board
    assert "(* keep *) wire pixel_clk;" in board


def test_cyclone_timing_derives_the_pll_clocks() -> None:
    from synccore.emit.first_light.board_pins import render_timing

    sdc = render_timing(_plan("cyclone", 50), "bars")
    assert "\nderive_pll_clocks\n" in sdc
    assert "get_nets" not in sdc


@pytest.mark.parametrize("key", list(JOBS))
def test_golden(tmp_path: Path, key: str) -> None:
    plan = plan_of(JOBS[key])
    for path in synccore.write(plan.spec, tmp_path, pattern="bars", clock=plan, accept_clock_error=True):
        if "_board" in path.name:
            golden_files.check(Path("board", key, path.name), path.read_text())


def test_build_names_the_board_top(tmp_path: Path) -> None:
    spec = tmp_path / "vga800.yaml"
    spec.write_text(VGA_800x600)
    result = CliRunner().invoke(main, ["build", str(spec), "-o", str(tmp_path / "out"),
                                       "--pattern", "bars", "--clock"])  # fmt: skip
    assert result.exit_code == 0, result.output
    assert "synthesise vga800_board" in result.output
    assert f"wrote {tmp_path / 'out' / 'vga800_board.pcf'}" in result.output
