"""Timing constraints for the clock wrapper: SDC (create_clock), or XDC for Xilinx.

The file declares the board clock on the wrapper's input port and, for the
PLL route, the core clock (pixel clock / pixels_per_clock) on the wrapper's
output net, with the frequency the plan reaches.  Port and net names are
the wrapper's: when the wrapper sits inside a top module, rename them to
that module's ports and nets.  For Xilinx the XDC declares only the board
clock; Vivado derives the MMCM/PLL output clock from the primitive's
attributes (Xilinx UG903, "Automatically Derived Clocks": once the master
clock is defined, Vivado creates the generated clocks on the output pins of
the clock modifying blocks, MMCM and PLL among them in the 7 series).

For the clock-enable route the core runs on the board clock, so only the
board clock is declared; the core's paths could be relaxed to the ce rate
with multicycle constraints, which are left to the user.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.plan import ClockPlan
from synccore.emit._jinja import environment
from synccore.emit.clock.wrapper import build_clock_context, header_lines
from synccore.units import fixed, hz

XDC_FAMILIES = ("xc7-mmcm", "xc7-pll")


@dataclass(frozen=True)
class ClockLine:
    name: str
    period_ns: str
    target: str  # "get_ports" | "get_nets"
    object: str
    comment: str


def constraint_suffix(plan: ClockPlan) -> str:
    """``.xdc`` for Xilinx families, ``.sdc`` otherwise."""
    return ".xdc" if plan.family is not None and plan.family.key in XDC_FAMILIES else ".sdc"


def _period(f: Fraction) -> str:
    return fixed(Fraction(10**9) / f, 3)


def render_constraints(plan: ClockPlan) -> str:
    """The constraint file text for the plan's wrapper."""
    ctx = build_clock_context(plan)
    xdc = constraint_suffix(plan) == ".xdc"
    clocks = [ClockLine("board_clk", _period(plan.f_board), "get_ports", ctx.clk_in,
                        f"board clock, {hz(plan.f_board)}")]  # fmt: skip
    best = plan.best
    derived = ""
    if ctx.is_pll and best is not None:
        text = f"core clock, {hz(best.f_out)}, from the PLL"
        if xdc:
            derived = f"{text} ({_period(best.f_out)} ns): derived by Vivado from the attributes"
        else:
            clocks.append(ClockLine("core_clk", _period(best.f_out), "get_nets", ctx.clk, text))
    header = header_lines(plan, "Timing constraints for the clock")
    template = "clock/clock.xdc.j2" if xdc else "clock/clock.sdc.j2"
    return environment().get_template(template).render(
        header=[f"# {line}".rstrip() for line in header], clocks=clocks, derived=derived
    )  # fmt: skip
