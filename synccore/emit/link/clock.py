"""The DVI link clock wrapper ``<name>_link_clock`` and its timing constraints.

Ports (the shared contract): ``clk_in`` (board clock) -> ``clk_pixel`` (core clock =
pixel clock / ppc; on iCE40 the same net as ``clk_serial``), ``clk_serial`` (5 x the
pixel clock), ``ce`` (iCE40 only: one cycle in 5 x ppc of clk_serial, registered),
``locked``.  The instances come from :mod:`synccore.emit.link.clock_primitives`; the
Verilog and VHDL lines from the clock wrapper's views
(:mod:`synccore.emit.clock.views`); the templates ``link/link_clock.v.j2`` and
``link/link_clock.vhd.j2`` only lay them out.

The constraints declare the board clock on ``clk_in`` and both PLL outputs on the nets
the DVI top names ``pixel_clk`` and ``serial_clk`` (kept there with ``(* keep *)``),
with the frequencies reached.  For Xilinx the XDC declares only the board clock:
Vivado derives the MMCM/PLL output clocks from the primitive's attributes (Xilinx
UG903, "Automatically Derived Clocks"), and the file names them in comments.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from pathlib import PurePath

from synccore._version import __version__
from synccore.clocking.link import LinkPlan
from synccore.clocking.link_report import link_facts
from synccore.emit._columns import aligned
from synccore.emit._jinja import environment
from synccore.emit.clock.primitives import Instance
from synccore.emit.clock.views import (
    verilog_instance,
    vhdl_components,
    vhdl_instance,
    vhdl_type,
)
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.link.clock_primitives import PIXEL, SERIAL, link_primitives
from synccore.model import bits_for
from synccore.units import fixed, hz

__all__ = ["LinkClockContext", "link_clock_context", "link_clock_name",
           "link_constraint_suffix", "render_link_clock", "render_link_constraints"]  # fmt: skip

PIXEL_NET = "pixel_clk"
SERIAL_NET = "serial_clk"
"""The nets of the DVI top that carry the two clocks (kept there with (* keep *))."""

XDC_FAMILIES = ("xc7-mmcm", "xc7-pll")

LOCKED = "pll_locked"
"""The PLL's lock output inside the wrapper (VHDL-93 cannot read the output port)."""


@dataclass(frozen=True)
class LinkPort:
    name: str
    direction: str
    comment: str


@dataclass(frozen=True)
class LinkClockContext:
    """Everything the link clock templates need, precomputed."""

    name: str
    header: tuple[str, ...]
    ports: tuple[LinkPort, ...]
    instances: tuple[Instance, ...]
    wires: tuple[tuple[str, int | None], ...]
    bus_io: bool  # ALTPLL: clock buses, joined by wires
    serial: str  # internal serial clock net
    pixel: str  # internal core clock net (the serial net on iCE40)
    has_ce: bool
    factor: int  # serial clock cycles per core cycle (5 x ppc)
    count_last: int
    count_width: int


def link_clock_name(plan: LinkPlan) -> str:
    return f"{plan.spec.name}_link_clock"


def header_lines(plan: LinkPlan, what: str) -> tuple[str, ...]:
    """The generator mark, what the file is, and the plan in words."""
    rows = link_facts(plan)
    width = max(len(label) for label, _ in rows)
    return (
        f"{GENERATED_MARK} {__version__} from {PurePath(plan.spec.source).name}; do not edit, "
        "regenerate instead.",
        f"{what} for display timing core '{plan.spec.name}'.",
        "",
        *(f"{label.ljust(width)}  {value}" for label, value in rows),
    )


def link_clock_context(plan: LinkPlan) -> LinkClockContext:
    """The wrapper's context for the plan's best setting; ValueError without one."""
    if plan.setting is None or plan.serial_hz is None or plan.core_hz is None:
        raise ValueError("the link plan has no setting to emit")
    prims = link_primitives(plan, {"clk_in": "clk_in", "locked": LOCKED})
    has_ce = plan.core_tap.kind == "enable"
    core = "the serial clock; the core advances on ce" if has_ce else hz(plan.core_hz)
    ports = (
        LinkPort("clk_in", "in", f"board clock, {hz(plan.f_board)}"),
        LinkPort("clk_pixel", "out", f"core clock: {core}"),
        LinkPort("clk_serial", "out", f"serial clock, {hz(plan.serial_hz)} (5 x pixel clock)"),
        *((LinkPort("ce", "out", f"1 on one cycle in {plan.core_factor} of clk_serial"),)
          if has_ce else ()),
        LinkPort("locked", "out", "1 once the PLL is locked; hold the link in reset before"),
    )  # fmt: skip
    internal: tuple[tuple[str, int | None], ...] = ((SERIAL, None), (LOCKED, None))
    if not has_ce:
        internal += ((PIXEL, None),)
    return LinkClockContext(
        name=link_clock_name(plan), header=header_lines(plan, "DVI link clocks"), ports=ports,
        instances=prims.instances, wires=(*internal, *prims.wires), bus_io=prims.bus_io,
        serial=SERIAL, pixel=SERIAL if has_ce else PIXEL, has_ce=has_ce, factor=plan.core_factor,
        count_last=plan.core_factor - 1, count_width=bits_for(plan.core_factor - 1),
    )  # fmt: skip


def _ports(ctx: LinkClockContext, verilog: bool) -> list[str]:
    last = len(ctx.ports) - 1
    if verilog:
        rows = [(f"{'input  wire' if p.direction == 'in' else 'output wire'} {p.name}"
                 f"{',' if i < last else ''}", p.comment) for i, p in enumerate(ctx.ports)]
        return aligned(rows, "//")
    w = max(len(p.name) for p in ctx.ports)
    rows = [(f"{p.name.ljust(w)} : {'in ' if p.direction == 'in' else 'out'} std_logic"
             f"{';' if i < last else ''}", p.comment) for i, p in enumerate(ctx.ports)]
    return aligned(rows, "--")  # fmt: skip


def _view(ctx: LinkClockContext, language: str) -> dict[str, object]:
    verilog = language == "verilog"
    mark = "//" if verilog else "--"
    w = ctx.count_width
    return {
        "header": [f"{mark} {line}".rstrip() for line in ctx.header],
        "ports": _ports(ctx, verilog),
        "wires": [f"wire {'' if n is None else f'[{n - 1}:0] '}{name};" if verilog
                  else f"signal {name} : {vhdl_type(n)};" for name, n in ctx.wires],
        "instances": [verilog_instance(i) if verilog else vhdl_instance(i)
                      for i in ctx.instances],
        "components": [] if verilog else vhdl_components(ctx.instances),
        "count_msb": w - 1,
        "count_zero": f"{w}'d0", "count_one": f"{w}'d1",
        "count_last": f"{w}'d{ctx.count_last}" if verilog else str(ctx.count_last),
        "cyclone_in": "{1'b0, clk_in}",
    }  # fmt: skip


def render_link_clock(plan: LinkPlan, language: str) -> str:
    """The wrapper as Verilog-2001 (``verilog``) or VHDL (``vhdl``, -93 and -2008) text."""
    if language not in ("verilog", "vhdl"):
        raise ValueError(f"unknown language {language!r}; choose verilog or vhdl")
    ctx = link_clock_context(plan)
    suffix = "v" if language == "verilog" else "vhd"
    return environment().get_template(f"link/link_clock.{suffix}.j2").render(
        ctx=ctx, v=_view(ctx, language))


def link_constraint_suffix(plan: LinkPlan) -> str:
    """``.xdc`` for Xilinx families, ``.sdc`` otherwise."""
    return ".xdc" if plan.family.key in XDC_FAMILIES else ".sdc"


@dataclass(frozen=True)
class ClockLine:
    name: str
    period_ns: str
    target: str  # get_ports | get_nets
    object: str
    comment: str


def _period(f: Fraction) -> str:
    return fixed(Fraction(10**9) / f, 3)


def render_link_constraints(plan: LinkPlan, *, board_port: str = "clk_in") -> str:
    """The SDC (XDC for Xilinx) text declaring the board clock and the link's two clocks.

    ``board_port`` is the board clock's port: the wrapper's ``clk_in``, or the DVI top's pin.
    """
    if plan.serial_hz is None or plan.core_hz is None:
        raise ValueError("the link plan has no setting to emit")
    xdc = link_constraint_suffix(plan) == ".xdc"
    clocks = [ClockLine("board_clk", _period(plan.f_board), "get_ports", board_port,
                        f"board clock, {hz(plan.f_board)}")]  # fmt: skip
    derived = [
        ClockLine("serial_clk", _period(plan.serial_hz), "get_nets", SERIAL_NET,
                  f"serial clock, {hz(plan.serial_hz)}, from the PLL"),
    ]
    if plan.core_tap.kind == "enable":
        notes = [f"the core runs on {SERIAL_NET} and advances on ce, one cycle in "
                 f"{plan.core_factor}; {PIXEL_NET} is the same net"]  # fmt: skip
    else:
        derived.append(ClockLine("pixel_clk", _period(plan.core_hz), "get_nets", PIXEL_NET,
                                 f"core clock, {hz(plan.core_hz)}, from the same PLL"))
        notes = []
    if xdc:
        notes += [f"{c.comment} ({c.period_ns} ns): derived by Vivado from the attributes"
                  for c in derived]  # fmt: skip
    else:
        clocks += derived
    header = header_lines(plan, "Timing constraints for the DVI link clocks")
    return environment().get_template("link/link_clock.sdc.j2").render(
        header=[f"# {line}".rstrip() for line in header], clocks=clocks, notes=notes,
        xdc=xdc)  # fmt: skip
