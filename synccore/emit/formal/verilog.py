"""The property wrapper as Verilog with immediate assertions (Yosys ``read_verilog -formal``)."""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit._verilog import comment_lines, uint
from synccore.emit.formal.context import FormalContext, build_formal_context
from synccore.model import Timing
from synccore.spec import Spec

OUTPUTS = ("hsync", "vsync", "de", "hblank", "vblank", "x", "y", "line_start", "frame_start")
"""The core's outputs, each wired to ``core_<name>`` in the wrapper."""


def render_properties(spec: Spec, *, internals: bool = True) -> str:
    """The property wrapper ``<name>_props`` of ``spec``'s core, as Verilog text.

    ``internals=True`` adds the invariants on the generated core's counters
    (``h_pos``/``v_pos``, and ``h_lead``/``v_lead`` with a lead); the proof script
    connects them.  ``internals=False`` speaks of the core's ports only.
    """
    ctx = build_formal_context(Timing(spec), internals=internals)
    return environment().get_template("formal/props.v.j2").render(ctx=ctx, v=_view(ctx))


def _view(ctx: FormalContext) -> dict[str, object]:
    inputs = [ctx.port["clk"], ctx.port["reset"]] + ([ctx.port["ce"]] if ctx.has_ce else [])
    ports = [f"input wire {name}{',' if i < len(inputs) - 1 else ''}" for i, name in enumerate(inputs)]
    links = [(name, name) for name in inputs] + [(ctx.port[o], f"core_{o}") for o in OUTPUTS]
    width = max(len(port) for port, _ in links)
    connections = [f".{port.ljust(width)} ({wire}){',' if i < len(links) - 1 else ''}"
                   for i, (port, wire) in enumerate(links)]  # fmt: skip
    name_w = max(len(c.name) for c in ctx.constants)
    constants = []
    for c in ctx.constants:
        rng = "" if c.level else f"[{c.width - 1}:0]"
        lit = f"1'b{c.value}" if c.level else uint(c.value, c.width)
        constants.append(f"localparam {rng.ljust(7)} {c.name.ljust(name_w)} = {lit};  // {c.comment}")
    widths = {"h": ctx.h_msb + 1, "v": ctx.v_msb + 1}
    return {
        "header": comment_lines(ctx.header),
        "ports": ports,
        "connections": connections,
        "constants": constants,
        "h_zero": uint(0, ctx.h_msb + 1),
        "v_zero": uint(0, ctx.v_msb + 1),
        "x_zero": uint(0, ctx.x_msb + 1),
        "y_zero": uint(0, ctx.y_msb + 1),
        "x_from": "ref_hl" if ctx.has_lead else "ref_h",
        "y_from": "ref_vl" if ctx.has_lead else "ref_v",
        "flag_checks": [f"core_{f.name} == (ref_{f.axis}_to == {uint(f.at, widths[f.axis])})"
                        for f in ctx.flags],
    }
