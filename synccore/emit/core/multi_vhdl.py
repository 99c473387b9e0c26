"""VHDL emitter of the multi-mode core (analyses as -93 and -2008): literals, then ``multi.vhd.j2``."""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._vhdl import bit, comment_lines, port_lines
from synccore.emit.core.multi_context import MultiContext, build_multi_context
from synccore.model.multimode import MultiTiming
from synccore.spec import Spec


def render_multi_vhdl(spec: Spec) -> str:
    """The multi-mode core of ``spec`` (a spec with ``modes:``) as VHDL text."""
    ctx = build_multi_context(MultiTiming(spec))
    return environment().get_template("core/multi.vhd.j2").render(ctx=ctx, v=_view(ctx))


def _view(ctx: MultiContext) -> dict[str, object]:
    name_w = max([len(c.name) for c in ctx.constants] + [len("SCALE")])
    consts = []
    for c in ctx.constants:
        if c.is_level:
            values = ", ".join(bit(v) for v in c.values)
            decl = f"constant {c.name.ljust(name_w)} : mode_levels := ({values});"
        else:
            values = ", ".join(str(v) for v in c.values)
            decl = f"constant {c.name.ljust(name_w)} : mode_counts := ({values});"
        consts.append((decl, c.comment))
    if ctx.has_scale:
        consts.append((f"constant {'SCALE'.ljust(name_w)} : natural     := {ctx.scale};",
                       "x and y are divided by this"))  # fmt: skip
    decl_w = max(len(d) for d, _ in consts)
    outputs = [p for p in ctx.ports if p.direction == "out"]
    return {
        "header": comment_lines(ctx.header),
        "constants": [f"{d.ljust(decl_w)}  -- {c}" for d, c in consts],
        "ports": port_lines(ctx.ports),
        "reset": ctx.reset_port,
        "reset_level": bit(ctx.reset_active),
        "outputs": [(p.name, p.base + "_q") for p in outputs],
        "out_w": max(len(p.name) for p in outputs),
    }
