"""The board top level: from the board's oscillator pin to the display's pins, nothing to add.

``<name>_board`` wires, in this order:

* the board clock pin into the clock wrapper ``<name>_clock`` (the family's PLL, or
  for the clock-enable route a ce divider on the board clock);
* a reset held while the PLL is not locked or the board's reset button is pressed,
  and released through a two-flop synchroniser in the pixel clock domain;
* the first-light top level ``<name>_top`` (core, pattern generator, alignment and
  registered pins), whose outputs are the board top's pins.

Its ports are the FPGA's pins: the board clock, an active-low reset button (the
pin files give it a pull-up, so it may stay unwired), hsync, vsync, de and the
colour buses.  All names and levels are computed here; the templates only lay
them out.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.clocking.plan import ClockPlan
from synccore.emit import _verilog as vl
from synccore.emit import _vhdl as vh
from synccore.emit._columns import aligned
from synccore.emit._jinja import environment
from synccore.emit.clock.wrapper import ClockContext, build_clock_context, plan_lines
from synccore.emit.first_light.pattern import PatternContext, pattern_context
from synccore.units import hz


@dataclass(frozen=True)
class BoardPin:
    """One port of the board top: an FPGA pin."""

    name: str  # as emitted, e.g. "red[3]" for one bit of a bus in a pin file
    port: str  # the port it belongs to
    direction: str  # in | out
    width: int | None  # None: one bit
    msb: int  # width - 1 (0 for one bit)
    role: str  # clock | reset | hsync | vsync | de | red | green | blue
    comment: str  # what to connect it to


@dataclass(frozen=True)
class BoardContext:
    """Everything the board top's templates need, precomputed."""

    module: str
    header: tuple[str, ...]
    pattern: PatternContext
    clock: ClockContext
    is_pll: bool
    board_clk: str  # the board clock port
    reset_n: str  # the reset button port (active low)
    ports: tuple[BoardPin, ...]  # one per port, in port order
    pixel_clk: str  # the net the core runs on: the PLL's output, or the board clock itself
    locked: str  # the clock wrapper's lock output (PLL route)
    core_has_ce: bool
    ce_from_wrapper: bool  # the clock-enable route's ce drives the core's ce
    core_reset_inverted: bool  # the core's reset is active low: it gets the inverse
    f_board_text: str
    f_pixel_text: str


def board_module(plan: ClockPlan) -> str:
    """Name of the board top module / entity."""
    return f"{plan.spec.name}_board"


def _ports(plan: ClockPlan, pc: PatternContext, f_board: str) -> tuple[BoardPin, ...]:
    p = plan.spec.port_prefix
    core = pc.core
    pins = [
        BoardPin(p + "board_clk", p + "board_clk", "in", None, 0, "clock",
                 f"the board's {f_board} oscillator"),
        BoardPin(p + "reset_n", p + "reset_n", "in", None, 0, "reset",
                 "reset button to ground, active low (optional: the pull-up keeps it released)"),
        BoardPin(core.port["hsync"], core.port["hsync"], "out", None, 0, "hsync",
                 "the display's horizontal sync input"),
        BoardPin(core.port["vsync"], core.port["vsync"], "out", None, 0, "vsync",
                 "the display's vertical sync input"),
        BoardPin(core.port["de"], core.port["de"], "out", None, 0, "de",
                 "the panel's data-enable input (a VGA monitor has none: leave unwired)"),
    ]  # fmt: skip
    words = len(pc.channels[0].slices) if pc.channels else 1  # pixels per clock
    for ch in pc.channels:
        what = f"{ch.base}, {ch.bits} bit{'s' if ch.bits != 1 else ''}"
        if words > 1:  # one word per pixel of the cycle, pixel 0 (leftmost) in the low bits
            what += f" x {words} pixels, pixel 0 in bits {ch.slices[0][0]}:{ch.slices[0][1]}"
        pins.append(BoardPin(ch.name, ch.name, "out", ch.bus_msb + 1, ch.bus_msb, ch.base,
                             f"{what}, most significant bit {ch.bus_msb}"))  # fmt: skip
    return tuple(pins)


def bit_pins(ctx: BoardContext) -> tuple[BoardPin, ...]:
    """Every FPGA pin of the board top, buses split into bits (most significant first)."""
    out = []
    for pin in ctx.ports:
        if pin.width is None:
            out.append(pin)
            continue
        for bit in range(pin.width - 1, -1, -1):
            which = "most significant" if bit == pin.width - 1 else (
                "least significant" if bit == 0 else "")  # fmt: skip
            comment = f"{pin.role} colour, bit {bit}" + (f" ({which})" if which else "")
            out.append(BoardPin(f"{pin.port}[{bit}]", pin.port, pin.direction, None, 0, pin.role,
                                comment))  # fmt: skip
    return tuple(out)


def _header(plan: ClockPlan, pc: PatternContext, module: str, is_pll: bool) -> tuple[str, ...]:
    spec = plan.spec
    route = (f"the {plan.family.primitive} PLL in {spec.name}_clock" if plan.family is not None
             else f"a clock enable from {spec.name}_clock")  # fmt: skip
    lines = [
        pc.header[0],
        f"Board top level '{module}': board clock -> {route} -> reset synchroniser",
        f"-> '{pc.top}' (core '{spec.name}' + pattern '{pc.pattern}') -> registered pins.",
        "Synthesise this module as it is; fill in the pin file beside it.",
        "",
        *plan_lines(plan),
        "",
        "Reset: held while " + ("the PLL is not locked or " if is_pll else "")
        + "the reset button is pressed, and at configuration;",
        "asserted at once (asynchronously) and released on the pixel clock through two",
        "flip-flops (an asynchronous-assert, synchronous-release synchroniser: common",
        "practice), so that every register leaves reset on the same clock edge and no",
        "flip-flop sees the release near its clock edge.",
        "",
        "Hardware caution: check the FPGA bank's I/O voltage against the display input;",
        "VGA colour is 0-0.7 V into 75 ohm (size a resistor DAC for it), a panel's",
        "backlight needs its own supply; the parts' datasheets decide.",
    ]
    return tuple(lines)


def build_board_context(plan: ClockPlan, pattern: str) -> BoardContext:
    """The board top's context for ``plan``'s route and ``pattern``."""
    pc = pattern_context(plan.spec, pattern)
    clock = build_clock_context(plan)
    module = board_module(plan)
    best = plan.best
    assert best is not None  # build_clock_context refused a plan without a setting
    is_pll = clock.is_pll
    f_board = hz(plan.f_board)
    p = plan.spec.port_prefix
    return BoardContext(
        module=module,
        header=_header(plan, pc, module, is_pll),
        pattern=pc,
        clock=clock,
        is_pll=is_pll,
        board_clk=p + "board_clk",
        reset_n=p + "reset_n",
        ports=_ports(plan, pc, f_board),
        # the clock-enable route clocks everything from the board clock port itself: an
        # alias signal would put a VHDL delta cycle between the wrapper's ce and the core
        pixel_clk="pixel_clk" if is_pll else p + "board_clk",
        locked=clock.ports[2].name if is_pll else "",
        core_has_ce=pc.core.has_ce,
        ce_from_wrapper=not is_pll and pc.core.has_ce,
        core_reset_inverted=pc.core.reset_active == 0,
        f_board_text=f_board,
        f_pixel_text=hz(best.f_out),
    )


def verilog_port_lines(ports: tuple[BoardPin, ...]) -> list[str]:
    """The port list of a top whose ports are FPGA pins, with their comments, in Verilog."""
    rows = []
    for i, pin in enumerate(ports):
        kind = "input " if pin.direction == "in" else "output"
        bus = "      " if pin.width is None else f"[{pin.msb}:0]".ljust(6)
        sep = "," if i < len(ports) - 1 else ""
        rows.append((f"{kind} wire {bus} {pin.name}{sep}", pin.comment))
    return aligned(rows, "//")


def vhdl_port_lines(ports: tuple[BoardPin, ...]) -> list[str]:
    """The same in VHDL."""
    width = max(len(pin.name) for pin in ports)
    rows = []
    for i, pin in enumerate(ports):
        kind = "in " if pin.direction == "in" else "out"
        typ = "std_logic" if pin.width is None else f"std_logic_vector({pin.msb} downto 0)"
        sep = ";" if i < len(ports) - 1 else ""
        rows.append((f"{pin.name.ljust(width)} : {kind} {typ}{sep}", pin.comment))
    return aligned(rows, "--")


def render_board(plan: ClockPlan, pattern: str, language: str) -> str:
    """The board top of ``plan``'s spec with ``pattern``, in ``language`` ("verilog" or "vhdl")."""
    ctx = build_board_context(plan, pattern)
    if language == "verilog":
        view = {"header": vl.comment_lines(ctx.header), "ports": verilog_port_lines(ctx.ports)}
        return environment().get_template("first_light/board_top.v.j2").render(c=ctx, v=view)
    view = {"header": vh.comment_lines(ctx.header), "ports": vhdl_port_lines(ctx.ports)}
    return environment().get_template("first_light/board_top.vhd.j2").render(c=ctx, v=view)
