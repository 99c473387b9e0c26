"""The board top's constraint files: pins to fill in, in each vendor's format, and timing.

The pin file names every FPGA pin of ``<name>_board`` with a placeholder
location (:data:`PLACEHOLDER`) and, above each line, a comment saying what
to connect; the user replaces each placeholder with the package pin from the
board's schematic.  I/O standards are 3.3 V LVCMOS, with a caution to check
the bank's voltage.  The reset button gets a pull-up, so it may stay unwired.

=========  ======  =====================================================
family     file    what the open tools / the vendor's tool read in it
=========  ======  =====================================================
iCE40      .pcf    ``set_io`` and ``set_frequency`` (nextpnr-ice40 takes
                   the board clock's frequency from it)
ECP5       .lpf    ``LOCATE COMP``, ``IOBUF`` and ``FREQUENCY PORT``
Gowin      .cst    ``IO_LOC`` and ``IO_PORT``; the clock in the ``.sdc``
7 series   .xdc    ``PACKAGE_PIN``, ``IOSTANDARD``, ``create_clock``
Cyclone IV .qsf    location, ``IO_STANDARD`` and pull-up assignments
=========  ======  =====================================================

The timing file (``.sdc``; for the 7 series the ``.xdc`` above carries it)
declares the board clock on the board top's clock pin and the pixel clock on
its ``pixel_clk`` net (kept by name through synthesis) with the frequency the
plan reaches.  nextpnr-ice40 and nextpnr-ecp5 derive the PLL's output clock
from the board clock alone; nextpnr-himbaechel-gowin 0.11 does not (measured:
it falls back to its default 12 MHz), and reads the net line.  Quartus
derives it with ``derive_pll_clocks``, Vivado by itself (see
:mod:`synccore.emit.clock.constraints`).  The clock-enable route has no pin
file (no family is named) and only the board clock.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.plan import ClockPlan
from synccore.emit._jinja import environment
from synccore.emit.clock.constraints import XDC_FAMILIES
from synccore.emit.clock.wrapper import header_lines
from synccore.emit.first_light.board import BoardContext, bit_pins, build_board_context
from synccore.units import fixed, hz

PLACEHOLDER = "TODO_PIN"
"""The location every pin file carries until the user fills in the board's pin."""

PIN_SUFFIX = {"ice40": ".pcf", "ecp5": ".lpf", "gowin": ".cst", "xc7-mmcm": ".xdc",
              "xc7-pll": ".xdc", "cyclone": ".qsf"}  # fmt: skip
"""The pin-constraint file of each family, by family key."""

# The I/O standard of a 3.3 V bank in each vendor's spelling (the vendors' constraint
# references, from memory): ECP5 and Gowin IO_TYPE, Xilinx IOSTANDARD, Quartus IO_STANDARD.
IO_STANDARD = {"ecp5": "LVCMOS33", "gowin": "LVCMOS33", "xc7-mmcm": "LVCMOS33",
               "xc7-pll": "LVCMOS33", "cyclone": "3.3-V LVCMOS"}  # fmt: skip


@dataclass(frozen=True)
class PinLine:
    name: str  # the port or bus bit, e.g. red[3]
    comment: str  # what to connect it to
    is_clock: bool
    pull_up: bool


def _mhz(f: Fraction) -> str:
    return fixed(f / 10**6, 6).rstrip("0").rstrip(".")


def _period(f: Fraction) -> str:
    return fixed(Fraction(10**9) / f, 3)


def pin_suffix(plan: ClockPlan) -> str | None:
    """The pin file's suffix for the plan's family; None for the clock-enable route."""
    return None if plan.family is None else PIN_SUFFIX[plan.family.key]


def timing_suffix(plan: ClockPlan) -> str | None:
    """``.sdc``; None for the 7 series, whose ``.xdc`` pin file carries the timing."""
    return None if plan.family is not None and plan.family.key in XDC_FAMILIES else ".sdc"


def _lines(ctx: BoardContext) -> list[PinLine]:
    return [PinLine(p.name, p.comment, p.role == "clock", p.role == "reset") for p in bit_pins(ctx)]


def _header(plan: ClockPlan, what: str, mark: str) -> list[str]:
    lines = header_lines(plan, what)
    return [f"{mark} {line}".rstrip() for line in lines]


def render_pins(plan: ClockPlan, pattern: str) -> str:
    """The pin file of the board top, in the plan's family's own format."""
    if plan.family is None:
        raise ValueError("the clock-enable route names no family, so no pin file format")
    key = plan.family.key
    ctx = build_board_context(plan, pattern)
    template = "first_light/board_pins" + PIN_SUFFIX[key] + ".j2"
    best = plan.best
    assert best is not None
    return environment().get_template(template).render(
        header=_header(plan, f"Pin constraints for the board top '{ctx.module}'",
                       "//" if key == "gowin" else "#"),
        module=ctx.module, pins=_lines(ctx), placeholder=PLACEHOLDER, board_clk=ctx.board_clk,
        io_standard=IO_STANDARD.get(key, ""), f_board_mhz=_mhz(plan.f_board),
        f_board=hz(plan.f_board), board_period=_period(plan.f_board),
        pixel=hz(best.f_out), pixel_period=_period(best.f_out),
    )  # fmt: skip


def render_timing(plan: ClockPlan, pattern: str) -> str:
    """The SDC timing constraints of the board top (its real port and net names)."""
    ctx = build_board_context(plan, pattern)
    best = plan.best
    assert best is not None
    return environment().get_template("first_light/board_timing.sdc.j2").render(
        header=_header(plan, f"Timing constraints for the board top '{ctx.module}'", "#"),
        board_clk=ctx.board_clk, pixel_clk=ctx.pixel_clk, is_pll=ctx.is_pll,
        quartus=plan.family is not None and plan.family.key == "cyclone",
        f_board=hz(plan.f_board), board_period=_period(plan.f_board),
        pixel=hz(best.f_out), pixel_period=_period(best.f_out),
    )  # fmt: skip
