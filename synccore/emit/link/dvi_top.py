"""The DVI top level ``<name>_dvi``: from the board's oscillator pin to the TMDS pins.

It wires, in this order:

* the board clock pin into ``<name>_link_clock``: one PLL makes the core clock and the
  serial clock (5 x the pixel clock: 10 bits per pixel per lane, two per serial cycle
  through DDR outputs), in phase; on iCE40 everything runs on the serial clock with a
  clock enable one cycle in 5 x pixels_per_clock;
* a reset held while the PLL is not locked or the board's reset button is pressed,
  released through a two-flop synchroniser on the core clock;
* the link core ``<name>_tmds`` (first-light design, colour to 8 bits, TMDS encoders);
* the family's serialiser ``<name>_serialiser``, whose outputs are the TMDS pins.

All names are computed here; the templates only lay them out.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.clocking.link import LinkPlan
from synccore.emit import _verilog as vl
from synccore.emit import _vhdl as vh
from synccore.emit._jinja import environment
from synccore.emit.first_light.board import BoardPin, verilog_port_lines, vhdl_port_lines
from synccore.emit.link.clock import header_lines
from synccore.emit.link.link_core import LinkCoreContext, link_core_context
from synccore.emit.link.serialiser import SHIFT_FAMILIES
from synccore.units import hz


@dataclass(frozen=True)
class DviContext:
    module: str
    header: tuple[str, ...]
    link: LinkCoreContext
    clock: str  # the link clock wrapper's module
    serialiser: str
    ports: tuple[BoardPin, ...]
    board_clk: str
    reset_n: str
    pins: dict[str, str]  # clk_p, clk_n, data_p, data_n: the TMDS pins
    single_clock: bool  # iCE40: the core runs on the serial clock with a ce from the wrapper
    core_has_ce: bool
    core_reset_inverted: bool
    # the hard serialisers (OSERDESE2, OSER10) take the synchronised reset on their
    # asynchronous reset input, while the core takes it as a synchronous one
    reset_also_async: bool


def dvi_module(plan: LinkPlan) -> str:
    return f"{plan.spec.name}_dvi"


def _ports(plan: LinkPlan) -> tuple[BoardPin, ...]:
    p = plan.spec.port_prefix
    rows = (
        ("board_clk", "in", None, "clock", f"the board's {hz(plan.f_board)} oscillator"),
        ("reset_n", "in", None, "reset", "reset button to ground, active low (optional: pulled up)"),
        ("tmds_clk_p", "out", None, "tmds", "TMDS clock pair, +"),
        ("tmds_clk_n", "out", None, "tmds", "TMDS clock pair, -"),
        ("tmds_data_p", "out", 3, "tmds", "TMDS data pairs 0 (blue, syncs), 1 (green), 2 (red), +"),
        ("tmds_data_n", "out", 3, "tmds", "TMDS data pairs, -"),
    )
    return tuple(BoardPin(p + name, p + name, direction, width, (width or 1) - 1, role, comment)
                 for name, direction, width, role, comment in rows)  # fmt: skip


def _header(plan: LinkPlan, link: LinkCoreContext, module: str) -> tuple[str, ...]:
    spec = plan.spec
    mark, _, blank, *facts = header_lines(plan, "DVI top level")
    lines = [
        mark,
        f"DVI top level '{module}': board clock -> {plan.family.primitive} in "
        f"'{spec.name}_link_clock' ->",
        f"reset synchroniser -> link core '{link.module}' -> serialiser '{spec.name}_serialiser' "
        "-> TMDS pins.",
        "Synthesise this module as it is; fill in the pin file beside it.",
        "",
        *facts,
        "",
        f"Alignment: the core's lead aligns colour, syncs and de in '{link.top.top}'; they pass the",
        f"encoders together. latency: {link.latency} core cycles from the core's syncs to the words,",
        "then the serialiser's own (its header).",
        "DVI signalling: no HDMI InfoFrames or audio; HDMI sinks accept it.",
        "",
        "Hardware caution: TMDS is a DC-coupled current-mode link terminated at the sink",
        "(50 ohm to 3.3 V per line); use the pins and I/O standard the pin file names and",
        "the board's schematic; the connector's 5 V and hot-plug lines are not FPGA pins.",
    ]
    return tuple(lines)


def build_dvi_context(plan: LinkPlan, pattern: str) -> DviContext:
    spec = plan.spec
    link = link_core_context(spec, pattern)
    module = dvi_module(plan)
    p = spec.port_prefix
    return DviContext(
        module=module,
        header=_header(plan, link, module),
        link=link,
        clock=f"{spec.name}_link_clock",
        serialiser=f"{spec.name}_serialiser",
        ports=_ports(plan),
        board_clk=p + "board_clk",
        reset_n=p + "reset_n",
        pins={"clk_p": p + "tmds_clk_p", "clk_n": p + "tmds_clk_n", "data_p": p + "tmds_data_p",
              "data_n": p + "tmds_data_n"},  # fmt: skip
        single_clock=plan.family.key == "ice40",
        core_has_ce=link.top.core.has_ce,
        core_reset_inverted=link.top.core.reset_active == 0,
        reset_also_async=plan.family.key not in SHIFT_FAMILIES,
    )


def render_dvi_top(plan: LinkPlan, pattern: str, language: str) -> str:
    """The DVI top of ``plan``'s spec with ``pattern`` in ``language`` ("verilog" or "vhdl")."""
    c = build_dvi_context(plan, pattern)
    if language == "verilog":
        view = {"header": vl.comment_lines(c.header), "ports": verilog_port_lines(c.ports)}
        return environment().get_template("link/dvi_top.v.j2").render(c=c, v=view)
    view = {"header": vh.comment_lines(c.header), "ports": vhdl_port_lines(c.ports)}
    return environment().get_template("link/dvi_top.vhd.j2").render(c=c, v=view)
