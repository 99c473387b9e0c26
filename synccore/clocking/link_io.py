"""What each family needs to clock a DVI link, and how fast its output path may toggle.

Two facts per family, as data:

* how the core clock (pixel clock / pixels_per_clock) is made beside the serial clock
  (5 x the pixel clock) from the same PLL: a second output of the PLL whose divider is
  tied to the first (``output``), a clock divider after the PLL (``divider``), or no
  second clock at all, the core advancing on a clock enable (``enable``);
* the highest bit rate per lane the output path we use is rated for, with its source.

The rates are the slowest commercial speed grade's, so that a plan holds for every part
of the family.  None of them was read in the vendor's document while this was written:
each is marked "from memory" beside the document and table it is recalled from, to be
confirmed before a board depends on it.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

MBIT = 10**6


def _ints(low: int, high: int) -> tuple[Fraction, ...]:
    return tuple(Fraction(n) for n in range(low, high + 1))


@dataclass(frozen=True)
class IoLimit:
    """The highest bit rate per lane of one family's output path, and where it comes from."""

    rate: Fraction  # bit/s per lane
    path: str  # the output path, in the vendor's primitive names
    source: str  # document and table, with "from memory" where recalled


@dataclass(frozen=True)
class CoreTap:
    """How a family derives the core clock from the PLL that makes the serial clock.

    ``kind``: ``output`` (a second PLL output, divider ``param`` = ``factor`` x the serial
    output's divider, one of ``ratios``), ``divider`` (the vendor's clock divider after the
    PLL, by 5), ``enable`` (no second clock: a clock enable one cycle in 5 x ppc).
    ``ppc_one``: the family's 10:1 serialiser takes one symbol per core clock, so
    pixels_per_clock must be 1; ``why`` says so in the user's terms.
    """

    kind: str
    param: str | None = None
    ratios: tuple[Fraction, ...] = ()
    ppc_one: bool = False
    why: str = ""


# The output paths and their ratings (all from memory; see the module docstring).
IO_LIMITS: dict[str, IoLimit] = {
    "ice40": IoLimit(
        Fraction(550 * MBIT), "SB_IO DDR output (PIN_TYPE registered DDR)",
        "Lattice DS1040 iCE40 LP/HX data sheet: no DDR output rate is stated (from memory); "
        "taken as two bits per cycle of the 275 MHz sysCLOCK PLL output maximum "
        "(DS1040, sysCLOCK PLL Timing)"),
    "ecp5": IoLimit(
        Fraction(500 * MBIT), "ODDRX1F generic DDR output",
        "Lattice DS1044 (FPGA-DS-02012) ECP5 data sheet, External Switching "
        "Characteristics, generic DDRX1 output f_MAX 250 MHz (from memory)"),
    "xc7-mmcm": IoLimit(
        Fraction(950 * MBIT), "OSERDESE2 10:1 DDR in an HR bank, speed grade -1",
        "Xilinx DS181 Artix-7 data sheet, OSERDES switching characteristics, "
        "DDR data rate in HR banks, -1 (from memory)"),
    "gowin": IoLimit(
        Fraction(1000 * MBIT), "OSER10 with the TLVDS_OBUF/ELVDS_OBUF buffer",
        "Gowin DS100 GW1N data sheet, I/O features, LVDS data rate (from memory)"),
    "cyclone": IoLimit(
        Fraction(640 * MBIT), "ALTDDIO_OUT into an emulated LVDS (LVDS_E_3R) output, C8",
        "Intel Cyclone IV Device Handbook vol. 3, emulated LVDS transmitter timing "
        "specifications, C8 (from memory)"),
}
IO_LIMITS["xc7-pll"] = IO_LIMITS["xc7-mmcm"]

_SERDES_ONE = "its 10:1 serialiser takes one 10-bit symbol per pixel clock"

CORE_TAPS: dict[str, CoreTap] = {
    # SB_PLL40_CORE's second output (PLLOUTGLOBALB) needs the 2F_ variants; one output
    # and a clock enable keep every path in one clock domain.
    "ice40": CoreTap("enable"),
    # EHXPLLL: CLKOS_DIV 1-128 (TN1263, as for CLKOP_DIV in families.py).
    "ecp5": CoreTap("output", "CLKOS_DIV", _ints(1, 128)),
    # MMCME2/PLLE2 CLKOUT1_DIVIDE 1-128 (UG472; unisim models, as in families.py).
    "xc7-mmcm": CoreTap("output", "CLKOUT1_DIVIDE", _ints(1, 128), True, _SERDES_ONE),
    "xc7-pll": CoreTap("output", "CLKOUT1_DIVIDE", _ints(1, 128), True, _SERDES_ONE),
    # CLKDIV with DIV_MODE "5" (Gowin UG286, clock divider; from memory).
    "gowin": CoreTap("divider", "DIV_MODE", (Fraction(5),), True, _SERDES_ONE),
    # ALTPLL post-scale counter C1 1-512 (Cyclone IV handbook vol. 1 ch. 5).
    "cyclone": CoreTap("output", "C1", _ints(1, 512)),
}
