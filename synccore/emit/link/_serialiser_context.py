"""The serialiser's language-neutral context: ports, widths, counter and family facts.

Public through :mod:`synccore.emit.link.serialiser`.

Every family sends two bits per cycle of ``clk_serial`` (5 x the pixel clock)
through a DDR output, bit 0 of each symbol first (DVI 1.0, section 3.2.2,
from memory). The families differ in where the 10:1 happens:

=========  ==========================================  ======================
family     serialisation                               pins
=========  ==========================================  ======================
ecp5       shift register at clk_serial -> ODDRX1F      two ODDRX1F per pair
ice40      shift register at clk_serial (ce) -> SB_IO   two SB_IO per pair
cyclone    shift register at clk_serial -> ALTDDIO_OUT  two ALTDDIO_OUT per pair
xc7-*      OSERDESE2 master + slave, 10:1 DDR           OBUFDS
gowin      OSER10                                      TLVDS_OBUF
=========  ==========================================  ======================
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import PurePath

from synccore._version import __version__
from synccore.clocking import FAMILY_KEYS
from synccore.emit.core.context import GENERATED_MARK
from synccore.errors import ToolError
from synccore.model import bits_for
from synccore.spec import Spec
from synccore.units import hz

SHIFT_FAMILIES = ("ecp5", "ice40", "cyclone")
"""Families whose serialiser is our own shift register feeding a DDR output register."""

ONE_PIXEL_FAMILIES = ("xc7-mmcm", "xc7-pll", "gowin")
"""Families whose hard serialiser takes one 10-bit word per clk_pixel cycle."""

GOWIN_BUFFER = "TLVDS_OBUF"
"""The Gowin output buffer of each pair (see :data:`FAMILY_NOTES`)."""

ICE40_PIN_TYPE = "010001"
"""SB_IO PIN_TYPE: bits 5..2 = 0100 PIN_OUTPUT_DDR, bits 1..0 = 01 PIN_INPUT (iCE40 Technology
Library, SB_IO; from memory, and the same in the SB_IO model of Yosys techlibs/ice40/cells_sim.v)."""

CLOCK_SYMBOL = "0000011111"
"""The clock lane's symbol, bit 9 first as written: bit 0 (sent first) is 1, so five ones go
out, then five zeros; one symbol per pixel keeps the lane's period equal to the pixel clock."""

FAMILY_NOTES: dict[str, tuple[str, ...]] = {
    "ecp5": (
        "ECP5: a 10 x ppc bit shift register at clk_serial, two bits per cycle into ODDRX1F",
        "(D0 goes out first, in the high half of SCLK; from memory: Lattice TN1265 ECP5",
        "High-Speed I/O Interface, generic ODDRX1F). Each pair is pseudo-differential:",
        "the _n pin has its own ODDRX1F fed the inverted bits. ECP5 true LVDS drivers sit",
        "only on the A/B PIO pair (Lattice TN1262 / FPGA-TN-02032, sysI/O buffer overview)",
        "and, from memory, only in the left and right banks; two LVCMOS33 outputs work on",
        "any bank, which is where most boards put their TMDS pairs.",
    ),
    "ice40": (
        "iCE40: a 10 x ppc bit shift register at clk_serial into SB_IO in registered DDR",
        f"output mode (PIN_TYPE {ICE40_PIN_TYPE}): D_OUT_0 is registered on the rising edge",
        "and driven in the high half, D_OUT_1 on the falling edge and driven in the low half",
        "(iCE40 Technology Library, SB_IO; from memory). D_OUT_1 is therefore held in a",
        "rising-edge register so that both bits of a pair come from the same shift. iCE40",
        "has no differential output driver in most banks: both pins of a pair are",
        "single-ended LVCMOS33 outputs with complementary data.",
    ),
    "cyclone": (
        "Cyclone: a 10 x ppc bit shift register at clk_serial into ALTDDIO_OUT; datain_h is",
        "driven while outclock is high, datain_l while it is low, so datain_h is the earlier",
        "bit (Intel, ALTDDIO_OUT IP core signals: 'datain_h: input data for rising edge of",
        "outclock'). Each pair is pseudo-differential: two single-ended pins, the _n pin",
        "fed the inverted bits.",
    ),
    "xc7": (
        "7 series: OSERDESE2 master and slave in 10:1 DDR (DATA_RATE_OQ DDR, DATA_WIDTH 10),",
        "CLK = clk_serial, CLKDIV = clk_pixel; master D1..D8 carry bits 0..7 (D1 goes out",
        "first), the slave's D3 and D4 bits 8 and 9, through SHIFTOUT1/2 -> SHIFTIN1/2",
        "(Xilinx UG471, 7 Series SelectIO Resources, OSERDESE2 width expansion; from",
        "memory). OQ drives an OBUFDS, whose pins take IOSTANDARD TMDS_33.",
    ),
    "gowin": (
        "Gowin: OSER10, PCLK = clk_pixel, FCLK = clk_serial, D0 goes out first (Gowin UG289,",
        f"Programmable IO User Guide; from memory), into {GOWIN_BUFFER}. From memory (Gowin",
        "DS117 GW1NR data sheet and UG289): the GW1NR-9 has true LVDS output buffers in its",
        "top bank only, emulated LVDS (ELVDS_OBUF, external resistors) on every bank; boards",
        "with a DVI/HDMI connector on a GW1NR-9 route the pairs to the top bank, hence",
        f"{GOWIN_BUFFER}. Put ELVDS_OBUF here if the board's pairs sit in another bank.",
    ),
}


@dataclass(frozen=True)
class Port:
    name: str
    direction: str  # "in" | "out"
    width: int | None  # None: one bit
    role: str  # clk_pixel, clk_serial, ce, rst, word0..2, clk_p, clk_n, data_p, data_n
    comment: str


@dataclass(frozen=True)
class SerialiserContext:
    """Everything a serialiser template needs, precomputed."""

    name: str
    family: str
    header: tuple[str, ...]
    ports: tuple[Port, ...]
    ppc: int
    bits: int  # 10 x ppc: bits per word and per core cycle
    sr_high: int  # bits - 1
    clk_pixel_unused: bool  # a clk_pixel port that the family's logic does not use
    has_open_pins: bool  # the primitives have outputs left open (Verilog: lint note)
    is_shift: bool  # our shift register + DDR output register (ecp5, ice40, cyclone)
    is_ecp5: bool
    is_ice40: bool
    is_cyclone: bool
    is_xc7: bool
    is_gowin: bool
    serial_cycles: int  # clk_serial cycles per core cycle: 5 x ppc
    phase_width: int
    phase_last: int
    clock_word: str  # the clock lane's word, MSB first (ppc symbols)
    gowin_buffer: str
    ice40_pin_type: str

    def port(self, role: str) -> Port:
        return next(p for p in self.ports if p.role == role)


def module_name(spec: Spec) -> str:
    """Name of the serialiser module / entity."""
    return f"{spec.name}_serialiser"


def _check(spec: Spec, family_key: str) -> None:
    if family_key not in FAMILY_KEYS:
        raise ToolError(f"no serialiser for family {family_key!r}; choose one of "
                        f"{', '.join(FAMILY_KEYS)}", subject="family")  # fmt: skip
    ppc = spec.core.pixels_per_clock
    if family_key in ONE_PIXEL_FAMILIES and ppc != 1:
        raise ToolError(f"the {family_key} serialiser takes one pixel per clock (its hard "
                        f"serialiser loads 10 bits per clk_pixel cycle), got {ppc}",
                        subject="pixels_per_clock")  # fmt: skip


def _ports(spec: Spec, family_key: str) -> tuple[Port, ...]:
    ppc = spec.core.pixels_per_clock
    n = 5 * ppc
    ports: list[Port] = []
    if family_key != "ice40":
        ports.append(Port("clk_pixel", "in", None, "clk_pixel",
                          f"core clock, pixel clock / {ppc}; the words' clock"))  # fmt: skip
    ports.append(Port("clk_serial", "in", None, "clk_serial",
                      "5 x the pixel clock, in phase with clk_pixel (one PLL)"))  # fmt: skip
    ports.append(Port("rst", "in", None, "rst",
                      "synchronous reset, active high, released with the pixel domain"))  # fmt: skip
    if family_key == "ice40":
        ports.append(Port("ce", "in", None, "ce",
                          f"1 on one clk_serial cycle in {n}; the words are new on the next"))  # fmt: skip
    for lane, colour in enumerate(("blue, HSYNC/VSYNC", "green", "red")):
        ports.append(Port(f"tmds{lane}", "in", 10 * ppc, f"word{lane}",
                          f"channel {lane} ({colour}): pixel 0 in bits [9:0]"))  # fmt: skip
    ports += [
        Port("tmds_clk_p", "out", None, "clk_p", "TMDS clock pair, + pin"),
        Port("tmds_clk_n", "out", None, "clk_n", "TMDS clock pair, - pin"),
        Port("tmds_data_p", "out", 3, "data_p", "TMDS data pairs 2..0, + pins (0: channel 0)"),
        Port("tmds_data_n", "out", 3, "data_n", "TMDS data pairs 2..0, - pins"),
    ]
    return tuple(ports)


def _header(spec: Spec, family_key: str) -> tuple[str, ...]:
    source = PurePath(spec.source).name
    pixel = spec.pixel_clock_hz
    rate = hz(10 * pixel).replace("Hz", "bit/s")
    notes = FAMILY_NOTES["xc7" if family_key.startswith("xc7") else family_key]
    return (
        f"{GENERATED_MARK} {__version__} from {source}; do not edit, regenerate instead.",
        f"TMDS serialiser for display timing core '{spec.name}', family {family_key}.",
        "",
        f"pixel clock {hz(pixel)}; clk_serial {hz(5 * pixel)}; {rate} per lane",
        f"pixels per clock {spec.core.pixels_per_clock}; bit 0 of every symbol goes first;",
        "the clock lane sends the symbol 0000011111 once per pixel through the same path.",
        "",
        *notes,
    )


def serialiser_context(spec: Spec, family_key: str) -> SerialiserContext:
    """The serialiser's context for ``family_key``; ToolError for an unknown family or a ppc
    the family's hard serialiser cannot take."""
    _check(spec, family_key)
    ppc = spec.core.pixels_per_clock
    n = 5 * ppc
    return SerialiserContext(
        name=module_name(spec), family=family_key, header=_header(spec, family_key),
        ports=_ports(spec, family_key), ppc=ppc, bits=10 * ppc, sr_high=10 * ppc - 1,
        clk_pixel_unused=family_key in ("ecp5", "cyclone"),
        has_open_pins=family_key in ("ice40", "cyclone", "xc7-mmcm", "xc7-pll"),
        is_shift=family_key in SHIFT_FAMILIES, is_ecp5=family_key == "ecp5",
        is_ice40=family_key == "ice40", is_cyclone=family_key == "cyclone",
        is_xc7=family_key.startswith("xc7"), is_gowin=family_key == "gowin",
        serial_cycles=n, phase_width=bits_for(n - 1), phase_last=n - 1,
        clock_word=CLOCK_SYMBOL * ppc, gowin_buffer=GOWIN_BUFFER, ice40_pin_type=ICE40_PIN_TYPE,
    )  # fmt: skip
