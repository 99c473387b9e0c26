"""The DVI board top's pin file: every pin of ``<name>_dvi`` with a placeholder location.

Like the first-light pin files (:mod:`synccore.emit.first_light.board_pins`), in each
family's own format, with the TMDS pairs' I/O standard for that family and the cautions
of a DC-coupled, current-mode link. The user replaces every :data:`PLACEHOLDER` with the
package pin from the board's schematic.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from pathlib import PurePath

from synccore._version import __version__
from synccore.clocking import FAMILY_KEYS
from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.first_light.board_pins import PIN_SUFFIX, PLACEHOLDER
from synccore.errors import ToolError
from synccore.spec import Spec
from synccore.units import fixed, hz

# The TMDS pins' I/O standard in each vendor's spelling, and why (all from memory unless named).
TMDS_STANDARD: dict[str, tuple[str, str]] = {
    "ice40": ("", "iCE40 levels follow the bank's VCCIO (3.3 V): both pins of a pair are "
                  "single-ended LVCMOS33 outputs with complementary data (from memory)"),
    "ecp5": ("LVCMOS33", "both pins single-ended LVCMOS33, complementary data from two "
                         "ODDRX1F (pseudo-differential); ECP5 LVDS outputs exist only on A/B "
                         "pairs of some banks (Lattice FPGA-TN-02032) and are not used"),
    "gowin": ("LVCMOS33D", "the pair is one TLVDS_OBUF; LVCMOS33D in a 3.3 V bank, LVDS25 "
                           "needs a 2.5 V bank (from memory: Gowin UG289)"),
    "xc7-mmcm": ("TMDS_33", "OBUFDS with TMDS_33, available in 3.3 V HR banks only (from "
                            "memory: Xilinx UG471, SelectIO standards)"),
    "xc7-pll": ("TMDS_33", "OBUFDS with TMDS_33, available in 3.3 V HR banks only (from "
                           "memory: Xilinx UG471, SelectIO standards)"),
    "cyclone": ("3.3-V LVCMOS", "Cyclone IV has no TMDS standard: two single-ended "
                                "3.3-V LVCMOS pins with complementary data from two "
                                "ALTDDIO_OUT (pseudo-differential; from memory)"),
}  # fmt: skip

CAUTIONS = (
    "TMDS is DC-coupled and current-mode: the sink terminates each wire with 50 ohm to",
    "3.3 V (DVI 1.0, section 4; from memory). A pseudo-differential LVCMOS output into that",
    "load works on boards built for it (series resistors, or a level shifter / redriver on",
    "the board): check the board's schematic before connecting a display.",
)


@dataclass(frozen=True)
class DviPin:
    name: str  # port or bus bit, e.g. tmds_data_p[0]
    comment: str
    is_clock: bool
    pull_up: bool
    is_tmds: bool


def dvi_pin_suffix(family_key: str) -> str:
    """The pin file's suffix for ``family_key``: .pcf, .lpf, .cst, .xdc or .qsf."""
    if family_key not in PIN_SUFFIX:
        raise ToolError(f"no pin file for family {family_key!r}; choose one of "
                        f"{', '.join(FAMILY_KEYS)}", subject="family")  # fmt: skip
    return PIN_SUFFIX[family_key]


def _pins(spec: Spec) -> list[DviPin]:
    p = spec.port_prefix
    pins = [DviPin(p + "board_clk", "the board's oscillator", True, False, False),
            DviPin(p + "reset_n", "a reset button to ground (active low; may stay unwired)",
                   False, True, False),
            DviPin(p + "tmds_clk_p", "TMDS clock +", False, False, True),
            DviPin(p + "tmds_clk_n", "TMDS clock -", False, False, True)]  # fmt: skip
    for side, sign in (("p", "+"), ("n", "-")):
        for lane, colour in enumerate(("blue", "green", "red")):
            pins.append(
                DviPin(
                    f"{p}tmds_data_{side}[{lane}]", f"TMDS data {lane} {sign} ({colour})", False, False, True
                )
            )
    return pins


def render_dvi_pins(spec: Spec, family_key: str, *, f_board: Fraction | None = None) -> str:
    """The pin file of ``<name>_dvi`` for ``family_key``; with ``f_board`` (Hz) the board
    clock's frequency line as well."""
    suffix = dvi_pin_suffix(family_key)
    standard, why = TMDS_STANDARD[family_key]
    mark = "//" if family_key == "gowin" else "#"
    header = [
        f"{GENERATED_MARK} {__version__} from {PurePath(spec.source).name}; do not edit, regenerate instead.",
        f"Pin constraints for the DVI top '{spec.name}_dvi', family {family_key}.",
    ]
    return environment().get_template(f"link/dvi_pins{suffix}.j2").render(
        header=[f"{mark} {line}" for line in header],
        notes=[f"{mark} {line}".rstrip() for line in (f"TMDS pins: {why}.", "", *CAUTIONS)],
        module=f"{spec.name}_dvi", pins=_pins(spec), placeholder=PLACEHOLDER,
        tmds_standard=standard, io_standard="3.3-V LVCMOS" if family_key == "cyclone"
        else "LVCMOS33", has_frequency=f_board is not None,
        f_board=hz(f_board) if f_board is not None else "",
        f_board_mhz=fixed(f_board / 10**6, 6).rstrip("0").rstrip(".") if f_board else "",
        board_period=fixed(Fraction(10**9) / f_board, 3) if f_board else "",
    )  # fmt: skip
