"""The clock wrapper's Verilog and VHDL views: values as literals, lines aligned.

A view turns a :class:`~synccore.emit.clock.wrapper.ClockContext` into the
lines a template lays out (``clock_pll.v.j2``, ``clock_pll.vhd.j2``,
``clock_enable.v.j2``, ``clock_enable.vhd.j2``); templates compute nothing.

A ``bits`` parameter (a setting the vendor declares as a bit field: iCE40's
DIVR, DIVF, DIVQ and FILTER_RANGE) is written in decimal at its width in
Verilog (``4'd0``), as the plan states it; in VHDL it is a bit-string, the
only literal of a ``bit_vector`` generic that VHDL-93 also accepts (the
decimal form ``4D"0"`` is VHDL-2008 only, and the wrappers analyse under
both).  Integer and real parameters stay plain numbers: the vendors'
primitives declare them ``integer`` or ``real``, with no field width.
"""

from __future__ import annotations

from collections.abc import Callable

from synccore.emit._columns import aligned
from synccore.emit.clock.primitives import Instance, Value
from synccore.emit.clock.wrapper import ClockContext
from synccore.units import fixed


def _verilog_literal(v: Value) -> str:
    if v.kind == "int":
        return str(int(v.number))
    if v.kind == "bits":
        return f"{v.width}'d{int(v.number)}"
    if v.kind == "level":
        return f"{v.width}'b{int(v.number):0{v.width}b}"
    if v.kind == "str":
        return f'"{v.text}"'
    if v.kind == "real":
        return fixed(v.number, 3)
    raise AssertionError(v.kind)  # pragma: no cover


def _vhdl_literal(v: Value) -> str:
    if v.kind == "int":
        return str(int(v.number))
    if v.kind == "bits":
        return f'"{int(v.number):0{v.width}b}"'
    if v.kind == "level":
        return f"'{int(v.number)}'" if v.width == 1 else f'"{int(v.number):0{v.width}b}"'
    if v.kind == "str":
        return f'"{v.text}"'
    if v.kind == "real":
        return fixed(v.number, 3)
    raise AssertionError(v.kind)  # pragma: no cover


def _vhdl_generic_type(v: Value) -> str:
    return {
        "int": "integer",
        "bits": f"bit_vector({v.width - 1} downto 0)",
        "str": "string",
        "real": "real",
    }[v.kind]


def _vhdl_port_type(width: int | None) -> str:
    return "std_logic" if width is None else f"std_logic_vector({width - 1} downto 0)"


def _separated(items: list[str], sep: str) -> list[str]:
    return [item + (sep if i < len(items) - 1 else "") for i, item in enumerate(items)]


def _commas(rows: list[tuple[str, str]]) -> list[tuple[str, str]]:
    return [(t + ("," if i < len(rows) - 1 else ""), c) for i, (t, c) in enumerate(rows)]


def _instance_view(
    inst: Instance, literal: Callable[[Value], str], connect: str, mark: str
) -> dict[str, object]:
    """Aligned parameter and pin lines of one instance; ``connect`` is e.g. ``.{}({})``."""
    params = [(connect.format(p.name, literal(p.value)), p.comment) for p in inst.params]
    pins = [
        (connect.format(pin.name, pin.signal if pin.value is None else literal(pin.value)),
         pin.comment)
        for pin in inst.pins
    ]  # fmt: skip
    return {
        "primitive": inst.primitive,
        "label": inst.label,
        "params": aligned(_commas(params), mark),
        "pins": aligned(_commas(pins), mark),
    }


def verilog_view(ctx: ClockContext) -> dict[str, object]:
    """The Verilog lines of the wrapper: header, ports, wires, instances, divider literals."""
    insts = [_instance_view(i, _verilog_literal, ".{}({})", "//") for i in ctx.instances]
    ports = [
        (f"{'input  wire' if p.direction == 'in' else 'output wire'} {p.name}"
         f"{',' if i < len(ctx.ports) - 1 else ''}", p.comment)
        for i, p in enumerate(ctx.ports)
    ]  # fmt: skip
    wires = [f"wire {'' if w is None else f'[{w - 1}:0] '}{n};" for n, w in ctx.wires]
    return {
        "header": [f"// {line}".rstrip() for line in ctx.header],
        "ports": aligned(ports, "//"),
        "wires": wires,
        "instances": insts,
        "cyclone_in": f"{{1'b0, {ctx.clk_in}}}",
        "count_zero": f"{ctx.count_width}'d0",
        "count_one": f"{ctx.count_width}'d1",
        "count_last": f"{ctx.count_width}'d{ctx.divide - 1}",
        "count_msb": ctx.count_width - 1,
    }


def _vhdl_component(inst: Instance) -> dict[str, object]:
    """The component declaration of a primitive: its generics and ports, aligned."""
    gw = max((len(p.name) for p in inst.params), default=0)
    generics = [f"{p.name.ljust(gw)} : {_vhdl_generic_type(p.value)}" for p in inst.params]
    pw = max(len(pin.name) for pin in inst.pins)
    ports = [
        f"{pin.name.ljust(pw)} : {pin.direction.ljust(3)} {_vhdl_port_type(pin.width)}"
        for pin in inst.pins
    ]
    return {
        "primitive": inst.primitive,
        "generics": _separated(generics, ";"),
        "ports": _separated(ports, ";"),
    }


def vhdl_view(ctx: ClockContext) -> dict[str, object]:
    """The VHDL lines of the wrapper: header, ports, components (one per primitive), instances."""
    comps = []
    seen: set[str] = set()
    for inst in ctx.instances:
        if inst.primitive not in seen:
            seen.add(inst.primitive)
            comps.append(_vhdl_component(inst))
    insts = [_instance_view(i, _vhdl_literal, "{} => {}", "--") for i in ctx.instances]
    pw = max(len(p.name) for p in ctx.ports)
    ports = [
        (f"{p.name.ljust(pw)} : {'in ' if p.direction == 'in' else 'out'} std_logic"
         f"{';' if i < len(ctx.ports) - 1 else ''}", p.comment)
        for i, p in enumerate(ctx.ports)
    ]  # fmt: skip
    wires = [f"signal {n} : {_vhdl_port_type(w)};" for n, w in ctx.wires]
    return {
        "header": [f"-- {line}".rstrip() for line in ctx.header],
        "ports": aligned(ports, "--"),
        "wires": wires,
        "components": comps,
        "instances": insts,
        "count_last": ctx.divide - 1,
        "count_msb": ctx.count_width - 1,
    }


def verilog_instance(inst: Instance) -> dict[str, object]:
    """One instance's aligned Verilog parameter and pin lines (for other wrappers' views)."""
    return _instance_view(inst, _verilog_literal, ".{}({})", "//")


def vhdl_instance(inst: Instance) -> dict[str, object]:
    """One instance's aligned VHDL generic and port map lines."""
    return _instance_view(inst, _vhdl_literal, "{} => {}", "--")


def vhdl_components(instances: tuple[Instance, ...]) -> list[dict[str, object]]:
    """The component declaration of every primitive used, once each, in order of use."""
    comps = []
    seen: set[str] = set()
    for inst in instances:
        if inst.primitive not in seen:
            seen.add(inst.primitive)
            comps.append(_vhdl_component(inst))
    return comps


def vhdl_type(width: int | None) -> str:
    """``std_logic`` or ``std_logic_vector(w-1 downto 0)``."""
    return _vhdl_port_type(width)
