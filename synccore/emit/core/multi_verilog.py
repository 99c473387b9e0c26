"""Verilog-2001 emitter of the multi-mode core: literals for its context, then ``multi.v.j2``."""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._verilog import comment_lines, uint, vector
from synccore.emit.core.multi_context import ModeConstant, MultiContext, build_multi_context
from synccore.model.multimode import MultiTiming
from synccore.spec import Spec


def render_multi_verilog(spec: Spec) -> str:
    """The multi-mode core of ``spec`` (a spec with ``modes:``) as Verilog-2001 text."""
    ctx = build_multi_context(MultiTiming(spec))
    return environment().get_template("core/multi.v.j2").render(ctx=ctx, v=_view(ctx))


def _literal(c: ModeConstant, value: int) -> str:
    return f"1'b{value}" if c.is_level else uint(value, c.width)


def _aligned(pairs: list[tuple[str, str]]) -> list[str]:
    width = max(len(d) for d, _ in pairs)
    return [f"{d.ljust(width)}  // {c}" for d, c in pairs]


def _view(ctx: MultiContext) -> dict[str, object]:
    reset = ctx.reset_port
    edge = "negedge" if ctx.reset_active_low else "posedge"
    sensitivity = f"posedge {ctx.port['clk']}" + (f" or {edge} {reset}" if ctx.reset_async else "")
    name_w = max(len(c.name) for c in ctx.constants) + 3
    consts = []
    for c in ctx.constants:
        rng = "" if c.is_level else vector(c.width)
        for m, value in enumerate(c.values):
            decl = f"localparam {rng.ljust(7)} {(c.name + f'_M{m}').ljust(name_w)} = {_literal(c, value)};"
            consts.append((decl, f"mode {m}: {c.comment}"))
    current = [(f"reg {('' if c.is_level else vector(c.width)).ljust(7)} {c.current};",
                f"{c.comment}, of the mode in force") for c in ctx.constants]  # fmt: skip
    cases = []
    for m in [*range(1, ctx.count), 0]:
        cases.append({
            "label": "default" if m == 0 else uint(m, ctx.mode_width),
            "lines": [f"{c.current} = {c.name}_M{m};" for c in ctx.constants],
        })  # fmt: skip
    ports = []
    for i, p in enumerate(ctx.ports):
        kind = "input  wire" if p.direction == "in" else "output reg "
        text = f"{kind} {vector(p.width).ljust(7)} {p.name}{',' if i < len(ctx.ports) - 1 else ''}"
        ports.append((text, p.comment))
    return {
        "header": comment_lines(ctx.header),
        "constants": _aligned(consts),
        "current_decls": _aligned(current),
        "cases": cases,
        "ports": _aligned(ports),
        "sensitivity": sensitivity,
        "reset_condition": f"!{reset}" if ctx.reset_active_low else reset,
        "h_zero": uint(0, ctx.h_width),
        "v_zero": uint(0, ctx.v_width),
        "x_zero": uint(0, ctx.x_width),
        "y_zero": uint(0, ctx.y_width),
        "mode_zero": uint(0, ctx.mode_width),
        "last_mode": uint(ctx.last_mode, ctx.mode_width),
        "v_last": "c_v_last",
        "reset_hsync": "H_SYNC_OFF_M0",
        "reset_vsync": "V_SYNC_OFF_M0",
        "h_sync_on": "c_h_sync_on",
        "h_sync_off": "c_h_sync_off",
        "v_sync_on": "c_v_sync_on",
        "v_sync_off": "c_v_sync_off",
    }
