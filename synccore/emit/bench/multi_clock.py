"""A clock in HDL around a multi-mode core, for the switching bench in Icarus Verilog.

cocotb's clock toggles through the simulator interface, which Icarus runs at about
30 000 cycles a second; a clock written in Verilog runs at the simulator's own speed.
The wrapper has the core's ports (the clock as an output) and instantiates the core.
"""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._verilog import vector
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.core.multi_context import build_multi_context
from synccore.model import MultiTiming
from synccore.spec import Spec

CLOCKED_SUFFIX = "_clocked"
"""The wrapper is the core's name with this after it."""


def render_clocked_verilog(spec: Spec, *, half_period: int = 5) -> str:
    """The wrapper module ``<name>_clocked`` around the multi-mode core of ``spec``."""
    ctx = build_multi_context(MultiTiming(spec))
    ports, connections = [], []
    for i, p in enumerate(ctx.ports):
        end = "," if i < len(ctx.ports) - 1 else ""
        if p.base == "clk":
            kind = "output reg "
        else:
            kind = "input  wire" if p.direction == "in" else "output wire"
        ports.append(f"{kind} {vector(p.width).ljust(7)} {p.name}{end}")
        connections.append(f".{p.name}({p.name}){end}")
    return environment().get_template("bench/multi_clock.v.j2").render(
        mark=GENERATED_MARK, core=ctx.name, top=ctx.name + CLOCKED_SUFFIX, ports=ports,
        connections=connections, clk=ctx.port["clk"], half_period=half_period,
    )  # fmt: skip
