"""The clock wrapper as Verilog and VHDL text: the family's PLL primitive, or a ce divider.

The work is split by role: :mod:`synccore.emit.clock.primitives` builds each
family's primitive instances with the planned settings,
:mod:`synccore.emit.clock.wrapper` the language-neutral context (ports,
wires, the ce divider's terminal count), :mod:`synccore.emit.clock.views`
the lines of each language; this module renders them through the templates
(``clock_pll.v.j2``, ``clock_pll.vhd.j2``, ``clock_enable.v.j2``,
``clock_enable.vhd.j2``), which only lay them out.
"""

from __future__ import annotations

from synccore.clocking.plan import ClockPlan
from synccore.emit._jinja import environment
from synccore.emit.clock.views import verilog_view, vhdl_view
from synccore.emit.clock.wrapper import build_clock_context, module_name

__all__ = ["build_clock_context", "module_name", "render_clock_verilog", "render_clock_vhdl"]


def render_clock_verilog(plan: ClockPlan) -> str:
    """The clock wrapper of ``plan`` as Verilog-2001 text."""
    ctx = build_clock_context(plan)
    template = "clock/clock_pll.v.j2" if ctx.is_pll else "clock/clock_enable.v.j2"
    return environment().get_template(template).render(ctx=ctx, v=verilog_view(ctx))


def render_clock_vhdl(plan: ClockPlan) -> str:
    """The clock wrapper of ``plan`` as VHDL text (analyses under -93 and -2008)."""
    ctx = build_clock_context(plan)
    template = "clock/clock_pll.vhd.j2" if ctx.is_pll else "clock/clock_enable.vhd.j2"
    return environment().get_template(template).render(ctx=ctx, v=vhdl_view(ctx))
