"""Verilog-2001 emitter: language literals for the shared context, then ``core.v.j2``."""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._verilog import comment_lines, uint, vector
from synccore.emit.core.context import CoreContext, build_context
from synccore.emit.core.multi_verilog import render_multi_verilog
from synccore.model import Timing
from synccore.spec import Spec


def render_verilog(spec: Spec) -> str:
    """The core of ``spec`` as Verilog-2001 text (the multi-mode core for a spec with ``modes:``)."""
    if spec.modes:
        return render_multi_verilog(spec)
    ctx = build_context(Timing(spec))
    return environment().get_template("core/core.v.j2").render(ctx=ctx, v=_verilog_view(ctx))


def _verilog_view(ctx: CoreContext) -> dict[str, object]:
    reset = ctx.reset_port
    edge = "negedge" if ctx.reset_active_low else "posedge"
    sensitivity = f"posedge {ctx.port['clk']}" + (f" or {edge} {reset}" if ctx.reset_async else "")
    used = [c for c in ctx.constants if c.in_verilog]
    name_w = max(len(c.name) for c in used)
    consts = []
    for c in used:
        rng = "" if c.is_level else vector(c.width)
        lit = f"1'b{c.value}" if c.is_level else uint(c.value, c.width)
        decl = f"localparam {rng.ljust(7)} {c.name.ljust(name_w)} = {lit};"
        consts.append((decl, c.comment))
    decl_w = max(len(d) for d, _ in consts)
    ports = []
    for i, p in enumerate(ctx.ports):
        kind = "input  wire" if p.direction == "in" else "output reg "
        text = f"{kind} {vector(p.width).ljust(7)} {p.name}{',' if i < len(ctx.ports) - 1 else ''}"
        ports.append((text, p.comment))
    port_w = max(len(t) for t, _ in ports)
    return {
        "header": comment_lines(ctx.header),
        "constants": [f"{d.ljust(decl_w)}  // {c}" for d, c in consts],
        "ports": [f"{t.ljust(port_w)}  // {c}" for t, c in ports],
        "sensitivity": sensitivity,
        "reset_condition": f"!{reset}" if ctx.reset_active_low else reset,
        "h_zero": uint(0, ctx.h_width),
        "v_zero": uint(0, ctx.v_width),
        "x_zero": uint(0, ctx.x_width),
        "y_zero": uint(0, ctx.y_width),
        "x_shift_zeros": uint(0, ctx.x_shift) if ctx.x_shift else "",
    }
