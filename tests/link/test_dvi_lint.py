"""The whole DVI design of every family lints clean, and the vendor primitives get legal values.

Lint: every file ``synccore.write(..., link=...)`` writes, with the top ``<name>_dvi``,
through Verilator --lint-only -Wall and Icarus -Wall (the I/O primitives from our models,
templates/bench/io_models.v.j2; the PLLs as black boxes built from the instances, as
tests/emit/test_link_clock.py does) and the VHDL through GHDL -93 and -08 with -Werror.

Parameters: the 7 series and Cyclone primitives are black boxes to every open tool, so
their parameter values are checked here against the vendors' documented ranges (each
check names its document; "from memory" where the range was recalled).
"""

from __future__ import annotations

import dataclasses
import re
from collections.abc import Callable
from fractions import Fraction
from pathlib import Path

import pytest

import synccore
from synccore.clocking import FAMILY_KEYS
from synccore.emit.link.serialiser import render_io_models
from synccore.verification.tools import Tool
from tests.emit.test_link_clock import BOARD, stub_for
from tests.hdl import ghdl_analyse, iverilog_compile, run
from tests.link.dvi_jobs import SOURCES, VGA_25

# VESA DMT 640x480@60 (DMT ID 04h, 25.175 MHz) from the library; on ECP5 the same raster at
# 25 MHz (tests/link/dvi_jobs.py: the ECP5 PLL makes 125 MHz, not 125.875, from 25 MHz).
DMT_04 = "name: vga\nstandard: DMT 04h\n"
CASES = [(key, 1, key == "ice40") for key in FAMILY_KEYS] + [
    ("ecp5", 2, False),  # two pixels per clock through the shift-register serialiser
    ("ice40", 2, True),
    ("cyclone", 2, True),  # a clock enable tied high by the top
]


def design(folder: Path, key: str, ppc: int, ce: bool) -> list[Path]:
    spec = synccore.loads(VGA_25 if key == "ecp5" else DMT_04, "vga.yaml")
    core = dataclasses.replace(spec.core, pixels_per_clock=ppc, clock_enable=ce)
    spec = dataclasses.replace(spec, core=core)
    plan = synccore.plan_dvi_link(spec, BOARD[key] * 10**6, key)
    assert plan.ok, plan
    written = synccore.write(spec, folder, pattern="bars", link=plan)
    (folder / "io_models.v").write_text(render_io_models())
    (folder / "pll_stub.v").write_text(stub_for(plan))
    return written


def _ids(case: tuple[str, int, bool]) -> str:
    return f"{case[0]}-ppc{case[1]}{'-ce' if case[2] else ''}"


@pytest.mark.sim
@pytest.mark.parametrize("case", CASES, ids=_ids)
def test_verilog_lints_clean(tmp_path: Path, case: tuple[str, int, bool],
                             need_tool: Callable[[str], Tool]) -> None:  # fmt: skip
    tool = need_tool("verilator")
    written = design(tmp_path, *case)
    sources = [f"vga{s}.v" for s in SOURCES]
    # every Verilog file written is in the lint, and nothing else of ours
    assert sorted(p.name for p in written if p.suffix == ".v") == sorted(sources)
    models = ["io_models.v", "pll_stub.v"]
    run(["verilator", "--lint-only", "-Wall", "--top-module", "vga_dvi", *sources, *models],
        tmp_path, tool.env)  # fmt: skip
    (tmp_path / "all.v").write_text("".join((tmp_path / s).read_text() for s in sources + models))
    iverilog_compile(tmp_path / "all.v")


@pytest.mark.sim
@pytest.mark.parametrize("std", ["93", "08"])
@pytest.mark.parametrize("case", CASES, ids=_ids)
def test_vhdl_analyses_clean(tmp_path: Path, case: tuple[str, int, bool], std: str,
                             need_program: Callable[[str], str]) -> None:  # fmt: skip
    need_program("ghdl")
    written = design(tmp_path, *case)
    vhdl = [f"vga{s}.vhd" for s in SOURCES]
    assert sorted(p.name for p in written if p.suffix == ".vhd") == sorted(vhdl)
    # one file in dependency order: GHDL analyses units in the order it reads them
    (tmp_path / "all.vhd").write_text("".join((tmp_path / s).read_text() for s in vhdl))
    ghdl_analyse(tmp_path / "all.vhd", std)


# ---------------------------------------------------------------------------------------
# Parameter values of the primitives no open tool checks
# ---------------------------------------------------------------------------------------

def instances(text: str, primitive: str) -> list[dict[str, str]]:
    """The parameter assignments of every ``primitive #(...)`` instance in Verilog text."""
    text = re.sub(r"//[^\n]*", "", text)
    found = []
    for body in re.findall(rf"\b{primitive}\s*#\((.*?)\)\s*\w+\s*\(", text, re.S):
        found.append({k: v.strip().strip('"') for k, v in
                      re.findall(r"\.(\w+)\s*\(\s*([^()]*?)\s*\)", body)})  # fmt: skip
    return found


def _written(tmp_path: Path, key: str, ppc: int = 1, ce: bool = False) -> dict[str, str]:
    design(tmp_path, key, ppc, ce)
    return {p.name: p.read_text() for p in tmp_path.glob("vga*.v")}


def _steps(value: str, low: Fraction, high: Fraction, step: Fraction) -> bool:
    x = Fraction(value)
    return low <= x <= high and x % step == 0


def test_oserdese2_parameters(tmp_path: Path) -> None:
    for key in ("xc7-mmcm", "xc7-pll"):
        found = instances(_written(tmp_path / key, key)["vga_serialiser.v"], "OSERDESE2")
        # four lanes (three data and the clock), each a MASTER and a SLAVE for 10:1
        assert len(found) == 8
        for p in found:
            # Xilinx UG953 (7 Series Libraries Guide), OSERDESE2 attributes, and UG471
            # (7 Series SelectIO Resources), OSERDESE2 width expansion (from memory):
            assert p["DATA_RATE_OQ"] == "DDR"  # DDR | SDR
            assert int(p["DATA_WIDTH"]) == 10  # DDR: 4, 6, 8, 10 or 14; 10 and 14 need a SLAVE
            assert p["DATA_RATE_TQ"] in ("BUF", "SDR", "DDR")
            # TRISTATE_WIDTH 1 with a BUF or SDR 3-state path, 4 with DDR
            assert int(p["TRISTATE_WIDTH"]) == (4 if p["DATA_RATE_TQ"] == "DDR" else 1)
        assert sorted(p["SERDES_MODE"] for p in found) == ["MASTER"] * 4 + ["SLAVE"] * 4


def test_xc7_clock_parameters(tmp_path: Path) -> None:
    mmcm = instances(_written(tmp_path / "m", "xc7-mmcm")["vga_link_clock.v"], "MMCME2_BASE")
    pll = instances(_written(tmp_path / "p", "xc7-pll")["vga_link_clock.v"], "PLLE2_BASE")
    assert len(mmcm) == 1 and len(pll) == 1
    # Xilinx UG953, MMCME2_BASE attributes (from memory): CLKFBOUT_MULT_F 2.000-64.000 and
    # CLKOUT0_DIVIDE_F 1.000-128.000 in steps of 0.125, CLKOUT1..6_DIVIDE 1-128,
    # DIVCLK_DIVIDE 1-106, CLKIN1_PERIOD 0.000-100.000 ns, BANDWIDTH OPTIMIZED|HIGH|LOW
    m = mmcm[0]
    eighth = Fraction(1, 8)
    assert _steps(m["CLKFBOUT_MULT_F"], Fraction(2), Fraction(64), eighth)
    assert _steps(m["CLKOUT0_DIVIDE_F"], Fraction(1), Fraction(128), eighth)
    assert 1 <= int(m["CLKOUT1_DIVIDE"]) <= 128 and 1 <= int(m["DIVCLK_DIVIDE"]) <= 106
    assert 0 < Fraction(m["CLKIN1_PERIOD"]) <= 100 and m["BANDWIDTH"] in ("OPTIMIZED", "HIGH", "LOW")
    # the contract: the core clock (CLKOUT1) is the serial clock (CLKOUT0) / 5
    assert Fraction(m["CLKOUT1_DIVIDE"]) == 5 * Fraction(m["CLKOUT0_DIVIDE_F"])
    # Xilinx UG953, PLLE2_BASE attributes (from memory): CLKFBOUT_MULT 2-64 (whole),
    # CLKOUT0..5_DIVIDE 1-128, DIVCLK_DIVIDE 1-56, CLKIN1_PERIOD 0.000-52.631 ns
    p = pll[0]
    assert 2 <= int(p["CLKFBOUT_MULT"]) <= 64 and 1 <= int(p["DIVCLK_DIVIDE"]) <= 56
    assert all(1 <= int(p[f"CLKOUT{i}_DIVIDE"]) <= 128 for i in (0, 1))
    assert 0 < Fraction(p["CLKIN1_PERIOD"]) <= Fraction("52.631")
    assert int(p["CLKOUT1_DIVIDE"]) == 5 * int(p["CLKOUT0_DIVIDE"])
    # both VCOs inside their range: MMCME2 600-1200 MHz, PLLE2 800-1600 MHz at the slowest
    # speed grade (Xilinx DS181 Artix-7 data sheet, MMCM/PLL switching characteristics;
    # from memory)
    for q, mult, low, high in ((m, "CLKFBOUT_MULT_F", 600, 1200), (p, "CLKFBOUT_MULT", 800, 1600)):
        vco = Fraction(1000) / Fraction(q["CLKIN1_PERIOD"]) * Fraction(q[mult]) / int(q["DIVCLK_DIVIDE"])
        assert low <= vco <= high, vco


# Intel ALTDDIO_OUT parameters (Intel "ALTDDIO_IN, ALTDDIO_OUT, and ALTDDIO_BIDIR IP Cores
# User Guide", parameter table; from memory): every name the IP core takes, with its
# legal values (None: an integer of at least 1; "family": a device family name).
ALTDDIO_OUT = {"width": None, "intended_device_family": "family",
               "power_up_high": ("ON", "OFF"), "oe_reg": ("REGISTERED", "UNREGISTERED"),
               "extend_oe_disable": ("ON", "OFF"), "invert_output": ("ON", "OFF"),
               "lpm_type": ("altddio_out",), "lpm_hint": "any"}  # fmt: skip
CYCLONE_FAMILIES = ("Cyclone IV E", "Cyclone IV GX")  # Quartus family names (from memory)


@pytest.mark.parametrize("ppc", [1, 2])
def test_cyclone_altddio_out_parameters(tmp_path: Path, ppc: int) -> None:
    found = instances(_written(tmp_path, "cyclone", ppc, ppc == 2)["vga_serialiser.v"],
                      "altddio_out")  # fmt: skip
    assert len(found) == 8  # both pins of four pairs, each from its own DDR register
    for p in found:
        assert set(p) <= set(ALTDDIO_OUT), set(p) - set(ALTDDIO_OUT)
        for name, value in p.items():
            legal = ALTDDIO_OUT[name]
            if legal is None:
                assert int(value) >= 1
            elif legal == "family":
                assert value in CYCLONE_FAMILIES
            elif legal != "any":
                assert value in legal, (name, value)


@pytest.mark.parametrize("ppc", [1, 2])
def test_cyclone_altpll_parameters(tmp_path: Path, ppc: int) -> None:
    text = _written(tmp_path, "cyclone", ppc, ppc == 2)["vga_link_clock.v"]
    (p,) = instances(text, "altpll")
    # Intel ALTPLL IP Core User Guide, parameters (from memory)
    assert p["lpm_type"] == "altpll" and p["intended_device_family"] in CYCLONE_FAMILIES
    assert p["operation_mode"] in ("NORMAL", "SOURCE_SYNCHRONOUS", "ZERO_DELAY_BUFFER",
                                   "NO_COMPENSATION", "EXTERNAL_FEEDBACK")  # fmt: skip
    assert p["compensate_clock"] in ("CLK0", "CLK1", "CLK2", "CLK3", "CLK4")
    assert int(p["width_clock"]) == 5  # Cyclone IV PLLs have five outputs, c0..c4
    assert int(p["inclk0_input_frequency"]) == 10**12 // (BOARD["cyclone"] * 10**6)  # ps
    for i in (0, 1):
        assert int(p[f"clk{i}_multiply_by"]) >= 1 and int(p[f"clk{i}_divide_by"]) >= 1
        assert 1 <= int(p[f"clk{i}_duty_cycle"]) <= 99
    # the counters the plan chose, from the wrapper's comments; Cyclone IV Device
    # Handbook, Clock Networks and PLLs (from memory): M, N and C counters 1-512,
    # VCO 600-1300 MHz
    m, n, c0 = (int(x) for x in re.search(r"M=(\d+) N=(\d+) C0=(\d+)", text).groups())  # type: ignore[union-attr]
    c1 = int(re.search(r"counter C1 = (\d+)", text).group(1))  # type: ignore[union-attr]
    assert all(1 <= x <= 512 for x in (m, n, c0, c1))
    assert 600 <= BOARD["cyclone"] * Fraction(m, n) <= 1300
    # the ratios Quartus is given are those counters' (clk_i = f_in x M / (N x C_i))
    assert Fraction(int(p["clk0_multiply_by"]), int(p["clk0_divide_by"])) == Fraction(m, n * c0)
    assert Fraction(int(p["clk1_multiply_by"]), int(p["clk1_divide_by"])) == Fraction(m, n * c1)
    assert c1 == 5 * ppc * c0  # contract: core clock = serial clock / (5 x ppc)
