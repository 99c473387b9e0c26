"""VHDL emitter (analyses as -93 and -2008): literals for the shared context, then ``core.vhd.j2``."""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._vhdl import bit, comment_lines, port_lines
from synccore.emit.core.context import CoreContext, build_context
from synccore.emit.core.multi_vhdl import render_multi_vhdl
from synccore.model import Timing
from synccore.spec import Spec


def render_vhdl(spec: Spec) -> str:
    """The core of ``spec`` as VHDL text that analyses under -93 and -2008 (multi-mode for ``modes:``)."""
    if spec.modes:
        return render_multi_vhdl(spec)
    ctx = build_context(Timing(spec))
    return environment().get_template("core/core.vhd.j2").render(ctx=ctx, v=_vhdl_view(ctx))


def _vhdl_view(ctx: CoreContext) -> dict[str, object]:
    reset = ctx.reset_port
    name_w = max([len(c.name) for c in ctx.constants]
                 + ([len("PIXELS_PER_CLOCK")] if ctx.ppc > 1 else []))  # fmt: skip
    consts = []
    for c in ctx.constants:
        if c.is_level:
            decl = f"constant {c.name.ljust(name_w)} : std_logic := {bit(c.value)};"
        else:
            decl = f"constant {c.name.ljust(name_w)} : natural   := {c.value};"
        consts.append((decl, c.comment))
    # Counters are integers (fast in simulators, sized by their range in synthesis); x and y
    # are the counts scaled by powers of two (the template multiplies by PIXELS_PER_CLOCK and
    # divides by SCALE), which synthesis turns into wiring.
    if ctx.ppc > 1:
        consts.append((f"constant {'PIXELS_PER_CLOCK'.ljust(name_w)} : natural   := {ctx.ppc};",
                       "pixels carried by each cycle"))  # fmt: skip
    if ctx.has_scale:
        consts.append((f"constant {'SCALE'.ljust(name_w)} : natural   := {ctx.scale};",
                       "x and y are divided by this"))  # fmt: skip
    decl_w = max(len(d) for d, _ in consts)
    outputs = [p for p in ctx.ports if p.direction == "out"]
    return {
        "header": comment_lines(ctx.header),
        "constants": [f"{d.ljust(decl_w)}  -- {c}" for d, c in consts],
        "ports": port_lines(ctx.ports),
        "reset": reset,
        "reset_level": bit(ctx.reset_active),
        "outputs": [(p.name, p.base + "_q") for p in outputs],
        "out_w": max(len(p.name) for p in outputs),
    }
