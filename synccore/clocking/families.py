"""The FPGA families whose clock synthesisers synccore can plan: one data entry each.

Every family is described by the same few facts: the legal ratios of its
input divider, feedback multiplier and output divider (each under the
vendor's parameter name and with the vendor's encoding of the value), the
frequency ranges of the input, the phase detector (PFD), the VCO and the
output, and where the feedback is taken from.  Two formulas cover them all.

Feedback from the VCO (``feedback="vco"``)::

    f_pfd = f_in / input divider;  f_vco = f_pfd * multiplier;  f_out = f_vco / output divider

Feedback from the output (``feedback="output"``)::

    f_pfd = f_in / input divider;  f_out = f_pfd * multiplier;  f_vco = f_out * output divider

Each constant names the vendor document it comes from; "from memory" marks
figures recalled rather than read from the document, to be confirmed.
Where a figure depends on the speed grade, the slowest commercial grade is
used so that a plan holds for every part of the family.

This module imports nothing else of synccore, so the spec's field table can
list the family names.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

from synccore.spec import FAMILY_NAMES

MHZ = 10**6


def _mhz(value: str) -> Fraction:
    return Fraction(value) * MHZ


def _steps(low: str, high: str, step: str) -> tuple[Fraction, ...]:
    lo, hi, st = Fraction(low), Fraction(high), Fraction(step)
    count = int((hi - lo) / st)
    return tuple(lo + i * st for i in range(count + 1))


def _ints(low: int, high: int) -> tuple[Fraction, ...]:
    return tuple(Fraction(n) for n in range(low, high + 1))


@dataclass(frozen=True)
class Divider:
    """One divider (or the feedback multiplier) of a clock synthesiser.

    ``ratios`` are the legal division (or multiplication) ratios, ascending.
    ``encoding`` says how a ratio is written into the vendor's parameter:
    ``ratio`` (as is), ``minus_one`` (ratio - 1) or ``log2`` (the exponent of
    a power-of-two ratio).
    """

    param: str
    ratios: tuple[Fraction, ...]
    encoding: str = "ratio"
    width: int | None = None  # bits of the parameter, for families that take bit vectors

    def value(self, ratio: Fraction) -> Fraction:
        """The parameter value that selects ``ratio``."""
        if self.encoding == "ratio":
            return ratio
        if self.encoding == "minus_one":
            return ratio - 1
        if self.encoding == "log2":
            n = int(ratio)
            if n != ratio or n & (n - 1):
                raise ValueError(f"{ratio} is not a power of two")
            return Fraction(n.bit_length() - 1)
        raise AssertionError(self.encoding)  # pragma: no cover


@dataclass(frozen=True)
class Range:
    """A closed frequency range in Hz; ``None`` where the vendor states no bound."""

    low: Fraction | None
    high: Fraction | None

    def holds(self, f: Fraction) -> bool:
        return (self.low is None or f >= self.low) and (self.high is None or f <= self.high)


@dataclass(frozen=True)
class Family:
    """One FPGA family's clock synthesiser, as its vendor documents it."""

    key: str  # the name users give on the command line and in the spec
    title: str
    primitive: str
    document: str
    input_range: Range
    pfd_range: Range
    vco_range: Range
    output_range: Range
    input_divider: Divider
    multiplier: Divider
    output_divider: Divider
    feedback: str  # "vco" | "output"
    notes: tuple[str, ...] = field(default=())
    # Families whose primitive takes the ratio rather than the counters (Intel's
    # ALTPLL): the names of the multiply and divide parameters.
    ratio_params: tuple[str, str] | None = None


# --------------------------------------------------------------------- iCE40
# Lattice TN1251 (now FPGA-TN-02052) "iCE40 sysCLOCK PLL Design and Usage Guide"
# and the iCE40 LP/HX Family Data Sheet DS1040, SB_PLL40_CORE in SIMPLE feedback.
# DS1040 version 3.4 (October 2017), DC and Switching Characteristics, "sysCLOCK
# PLL Timing": f_IN (REFERENCECLK) 10-133 MHz, f_OUT (PLLOUT) 16-275 MHz, f_VCO
# 533-1066 MHz, f_PFD 10-133 MHz (the iCE40 UltraPlus data sheet FPGA-DS-02008,
# table 4.22, gives the same four ranges); its Architecture section, "sysCLOCK
# Phase Locked Loops": "The output divider can have a value from 1 to 6" (DIVQ).
# The widths of DIVR (4 bits), DIVF (7 bits), DIVQ (3 bits) and FILTER_RANGE
# (3 bits) are those of the primitive's parameter declarations in Lattice's
# SiliconBlue model sb_ice_syn.v and in Yosys techlibs/ice40/cells_sim.v.
# From memory (TN1251): DIVR = divide - 1, DIVF = multiply - 1, and the VCO
# divided by 2**DIVQ.
ICE40 = Family(
    key="ice40",
    title="Lattice iCE40 (SB_PLL40_CORE, SIMPLE feedback)",
    primitive="SB_PLL40_CORE",
    document="Lattice TN1251, iCE40 sysCLOCK PLL Design and Usage Guide; DS1040 iCE40 LP/HX "
    "data sheet, sysCLOCK PLL Timing",
    input_range=Range(_mhz("10"), _mhz("133")),
    pfd_range=Range(_mhz("10"), _mhz("133")),
    vco_range=Range(_mhz("533"), _mhz("1066")),
    output_range=Range(_mhz("16"), _mhz("275")),
    input_divider=Divider("DIVR", _ints(1, 16), "minus_one", width=4),
    multiplier=Divider("DIVF", _ints(1, 128), "minus_one", width=7),
    output_divider=Divider("DIVQ", tuple(Fraction(2**q) for q in range(1, 7)), "log2", width=3),
    feedback="vco",
)

# Loop filter setting by PFD frequency, TN1251 (from memory): upper bounds in MHz.
ICE40_FILTER_RANGES: tuple[tuple[Fraction, int], ...] = (
    (_mhz("17"), 1),
    (_mhz("26"), 2),
    (_mhz("44"), 3),
    (_mhz("66"), 4),
    (_mhz("101"), 5),
    (_mhz("133"), 6),
)


def ice40_filter_range(f_pfd: Fraction) -> int:
    """SB_PLL40 FILTER_RANGE for a phase-detector frequency (TN1251, from memory)."""
    for upper, setting in ICE40_FILTER_RANGES:
        if f_pfd < upper:
            return setting
    return ICE40_FILTER_RANGES[-1][1]


# ---------------------------------------------------------------------- ECP5
# Lattice FPGA-TN-02200 (formerly TN1263) "ECP5 and ECP5-5G sysCLOCK PLL/DLL
# Design and Usage Guide" and the ECP5 family data sheet DS1044, sysCLOCK PLL
# timing: f_IN 8-400 MHz, f_OUT 3.125-400 MHz, f_VCO 400-800 MHz and CLKI_DIV,
# CLKFB_DIV, CLKOP_DIV 1-128 (checked against a published quotation of the data
# sheet's table, not the data sheet itself).  f_PFD 10-400 MHz: the data
# sheet's "fPFD Phase Detector Input Frequency 10 400 MHz" row as quoted, with
# the f_IN, f_OUT and f_VCO rows above, in a comment of a public EHXPLLL
# wrapper; the 3.125 MHz minimum used before was recalled, not read.
# With FEEDBK_PATH "CLKOP" the output is f_IN * CLKFB_DIV / CLKI_DIV and the VCO
# runs at f_OUT * CLKOP_DIV.
ECP5 = Family(
    key="ecp5",
    title="Lattice ECP5 (EHXPLLL, feedback from CLKOP)",
    primitive="EHXPLLL",
    document="Lattice FPGA-TN-02200 (TN1263) ECP5 sysCLOCK PLL/DLL guide; DS1044 ECP5 data "
    "sheet, sysCLOCK PLL timing (as quoted)",
    input_range=Range(_mhz("8"), _mhz("400")),
    pfd_range=Range(_mhz("10"), _mhz("400")),
    vco_range=Range(_mhz("400"), _mhz("800")),
    output_range=Range(_mhz("3.125"), _mhz("400")),
    input_divider=Divider("CLKI_DIV", _ints(1, 128)),
    multiplier=Divider("CLKFB_DIV", _ints(1, 128)),
    output_divider=Divider("CLKOP_DIV", _ints(1, 128)),
    feedback="output",
)

# ------------------------------------------------------------------ 7-series
# Xilinx UG472 "7 Series FPGAs Clocking Resources" attribute ranges, checked
# against Xilinx's unisim simulation models MMCME2_ADV.v and PLLE2_ADV.v
# (Vivado unified simulation library: M_MIN/M_MAX, D_MAX, O_MAX and their
# range checks): MMCME2 DIVCLK_DIVIDE 1-106, CLKFBOUT_MULT_F 2.000-64.000,
# CLKOUT0_DIVIDE_F 1 or 2.000-128.000, both in steps of 0.125 (the step as
# UG572 states it for the UltraScale MMCM; for UG472 from memory); PLLE2
# DIVCLK_DIVIDE 1-56, CLKFBOUT_MULT 2-64, CLKOUT0_DIVIDE 1-128.  The same
# models carry one set of frequency limits for all grades: minima MMCM CLKIN
# and PFD 10 MHz, VCO 600 MHz, PLL CLKIN and PFD 19 MHz, VCO 800 MHz (the
# same as DS181 below); maxima 1066/550/1600 and 1066/550/2133 MHz, beyond -1.
# Xilinx DS181 "Artix-7 FPGAs Data Sheet: DC and AC Switching Characteristics"
# v1.27, table 37 "MMCM Specification" and table 38 "PLL Specification", -1
# (and -1LI) column, as quoted in public design notes: MMCM_FINMIN/MAX 10/800 MHz,
# MMCM_FPFDMIN/MAX 10/450 MHz, MMCM_FVCOMIN/MAX 600/1200 MHz; PLL_FINMIN/MAX
# 19/800 MHz, PLL_FPFDMIN/MAX 19/450 MHz, PLL_FVCOMIN/MAX 800/1600 MHz (the
# Zynq-7000 data sheet DS187, table 72, is quoted with MMCM_FVCOMAX 1200 MHz
# for -1, 1440 for -2, 1600 for -3).  The output ranges are from memory:
# MMCM_FOUTMIN/MAX 4.69/800 MHz (the Kintex-7 figures quoted from DS182),
# PLL_FOUTMIN/MAX 6.25/800 MHz.  Kintex-7 (DS182) allows more.
XC7_MMCM = Family(
    key="xc7-mmcm",
    title="Xilinx 7-series MMCM (MMCME2_BASE), speed grade -1",
    primitive="MMCME2_BASE",
    document="Xilinx UG472 7 Series Clocking Resources and unisim models (ratios); DS181 "
    "Artix-7 tables 37-38, -1 (as quoted; output range from memory)",
    input_range=Range(_mhz("10"), _mhz("800")),
    pfd_range=Range(_mhz("10"), _mhz("450")),
    vco_range=Range(_mhz("600"), _mhz("1200")),
    output_range=Range(_mhz("4.69"), _mhz("800")),
    input_divider=Divider("DIVCLK_DIVIDE", _ints(1, 106)),
    multiplier=Divider("CLKFBOUT_MULT_F", _steps("2", "64", "0.125")),
    output_divider=Divider("CLKOUT0_DIVIDE_F", (Fraction(1), *_steps("2", "128", "0.125"))),
    feedback="vco",
)

XC7_PLL = Family(
    key="xc7-pll",
    title="Xilinx 7-series PLL (PLLE2_BASE), speed grade -1",
    primitive="PLLE2_BASE",
    document="Xilinx UG472 7 Series Clocking Resources and unisim models (ratios); DS181 "
    "Artix-7 tables 37-38, -1 (as quoted; output range from memory)",
    input_range=Range(_mhz("19"), _mhz("800")),
    pfd_range=Range(_mhz("19"), _mhz("450")),
    vco_range=Range(_mhz("800"), _mhz("1600")),
    output_range=Range(_mhz("6.25"), _mhz("800")),
    input_divider=Divider("DIVCLK_DIVIDE", _ints(1, 56)),
    multiplier=Divider("CLKFBOUT_MULT", _ints(2, 64)),
    output_divider=Divider("CLKOUT0_DIVIDE", _ints(1, 128)),
    feedback="vco",
)

# --------------------------------------------------------------------- Gowin
# Gowin UG286 "Gowin Clock User Guide", rPLL: CLKOUT = CLKIN * (FBDIV_SEL + 1)
# / (IDIV_SEL + 1), VCO = CLKOUT * ODIV_SEL.  The ranges are those of Gowin's
# rPLL primitive declaration (parameter comments "IDIV_SEL 0:1, 1:2 ... 63:64",
# the same for FBDIV_SEL, "ODIV_SEL 2/4/8/16/32/48/64/80/96/112/128"), as
# reproduced in Yosys techlibs/gowin/cells_sim.v.  Frequency limits of the
# GW1N(R)-9 class, C6/I5: CLKIN 3-400 MHz, PFD 3-400 MHz, VCO 400-1200 MHz,
# CLKOUT 3.125-600 MHz, as Gowin DS117-2.9.3E (GW1NR data sheet) table 4-21 is
# quoted in public project notes (the same for C7/I6; the slower C5/I4 grade has
# CLKIN and PFD 3-320, VCO 320-960, CLKOUT 2.5-480 MHz, so this entry holds for
# C6/I5 and faster parts only).  The GW1N data sheet DS100 was not seen.  Other
# Gowin devices have other VCO limits: check the device's data sheet.
GOWIN = Family(
    key="gowin",
    title="Gowin GW1N/GW1NR (rPLL), GW1N-9 class limits",
    primitive="rPLL",
    document="Gowin UG286 Clock User Guide; DS117 GW1NR data sheet table 4-21, C6/I5 "
    "(as quoted)",
    input_range=Range(_mhz("3"), _mhz("400")),
    pfd_range=Range(_mhz("3"), _mhz("400")),
    vco_range=Range(_mhz("400"), _mhz("1200")),
    output_range=Range(_mhz("3.125"), _mhz("600")),
    input_divider=Divider("IDIV_SEL", _ints(1, 64), "minus_one"),
    multiplier=Divider("FBDIV_SEL", _ints(1, 64), "minus_one"),
    output_divider=Divider(
        "ODIV_SEL", tuple(Fraction(n) for n in (2, 4, 8, 16, 32, 48, 64, 80, 96, 112, 128))
    ),
    feedback="output",
)

# -------------------------------------------------------------------- Intel
# Intel "Cyclone IV Device Handbook" vol. 1 ch. 5 (clock networks and PLLs):
# f_out = f_in * M / (N * K * C), counters N, M and C 1-512, K 1 or 2; vol. 3
# (device data sheet) table 1-25 PLL specifications: f_IN 5 MHz up to
# 265-472.5 MHz depending on the speed grade, f_INPFD 5-325 MHz, f_VCO
# 600-1300 MHz (checked against a published quotation of the handbook's
# table).  Intel Cyclone 10 LP Device Datasheet (Intel document 683251), "PLL
# Specifications", read: f_IN 5-472.5 MHz for -C6, -C8, -I7 and -A7 (362 MHz
# for -I8), f_INPFD 5-325 MHz, f_VCO 600-1300 MHz, f_OUT_EXT up to 472.5 MHz.
# The 402.5 MHz limit used here for grade C8 on the output (to the global
# clock network) is from memory, and so is its use on the input: lower than
# Cyclone 10 LP's 472.5 MHz, kept because the Cyclone IV C8 input limit was
# not seen.  The post-scale counter K (1 or 2) is left at 1.  ALTPLL takes the
# ratio (clk0_multiply_by / clk0_divide_by); Quartus picks the counters, which
# may differ from ours but give the same ratio.
CYCLONE = Family(
    key="cyclone",
    title="Intel Cyclone IV / Cyclone 10 LP (ALTPLL), speed grade C8",
    primitive="altpll",
    document="Intel Cyclone IV Device Handbook vol. 1 ch. 5 and vol. 3 table 1-25; "
    "Cyclone 10 LP Device Datasheet, PLL Specifications (C8 402.5 MHz limits from memory)",
    input_range=Range(_mhz("5"), _mhz("402.5")),
    pfd_range=Range(_mhz("5"), _mhz("325")),
    vco_range=Range(_mhz("600"), _mhz("1300")),
    output_range=Range(None, _mhz("402.5")),
    input_divider=Divider("N", _ints(1, 512)),
    multiplier=Divider("M", _ints(1, 512)),
    output_divider=Divider("C0", _ints(1, 512)),
    feedback="vco",
    ratio_params=("clk0_multiply_by", "clk0_divide_by"),
)

FAMILIES: dict[str, Family] = {f.key: f for f in (ICE40, ECP5, XC7_MMCM, XC7_PLL, GOWIN, CYCLONE)}
"""Every known family by its key, in the order they are listed to users."""

FAMILY_KEYS: tuple[str, ...] = tuple(FAMILIES)
if FAMILY_KEYS != FAMILY_NAMES:  # pragma: no cover - caught by every test run
    raise AssertionError(f"families {FAMILY_KEYS} differ from the format's {FAMILY_NAMES}")


def family(key: str) -> Family:
    """The family called ``key``; ``KeyError`` naming the valid keys otherwise."""
    try:
        return FAMILIES[key]
    except KeyError:
        raise KeyError(
            f"unknown FPGA family {key!r}; choose from {', '.join(FAMILY_KEYS)}"
        ) from None
