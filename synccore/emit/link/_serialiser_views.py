"""The serialiser's context turned into Verilog or VHDL pieces (names, literals, port lines)."""

from __future__ import annotations

from synccore.emit import _verilog, _vhdl
from synccore.emit._columns import aligned
from synccore.emit._jinja import environment
from synccore.emit.link._serialiser_context import SerialiserContext

LANES = (("data0", "tmds0", 0), ("data1", "tmds1", 1), ("data2", "tmds2", 2), ("clk", "", -1))
"""The four lanes: label, word port ("" for the clock lane's constant), pin index (-1: clock)."""

LANGUAGES = ("verilog", "vhdl")


def _pin(ctx: SerialiserContext, index: int, side: str, verilog: bool) -> str:
    """The output a lane's pin drives: ``tmds_data_p[0]`` / ``tmds_data_p(0)``, ``tmds_clk_n``."""
    if index < 0:
        return f"tmds_clk_{side}"
    return f"tmds_data_{side}[{index}]" if verilog else f"tmds_data_{side}({index})"


def _lanes(ctx: SerialiserContext, verilog: bool) -> list[dict[str, object]]:
    """One entry per lane for the shift-register families: register and bit-wire names."""
    lanes = []
    for label, word, index in LANES:
        const = f"{ctx.bits}'b{ctx.clock_word}" if verilog else f'"{ctx.clock_word}"'
        lanes.append({
            "label": label, "sr": f"sr_{label}", "word": word or const, "is_clock": not word,
            "first": f"first_{label}", "second": f"second_{label}",
            "first_n": f"first_n_{label}", "second_n": f"second_n_{label}",
            "p": _pin(ctx, index, "p", verilog), "n": _pin(ctx, index, "n", verilog),
        })  # fmt: skip
    return lanes


def _pins(ctx: SerialiserContext, lanes: list[dict[str, object]]) -> list[dict[str, object]]:
    """One DDR output register per pin: the _p pin takes the lane's bits, the _n pin the inverse."""
    pins = []
    for lane in lanes:
        for side, suffix in (("p", ""), ("n", "_n")):
            label = f"{lane['label']}_{side}"
            pins.append({
                "label": label, "target": lane[side], "pad": f"pad_{label}",
                "first": lane["first" + suffix], "second": lane["second" + suffix],
            })  # fmt: skip
    return pins


def _hard_lanes(ctx: SerialiserContext, verilog: bool) -> list[dict[str, object]]:
    """One entry per lane for the hard serialisers: the ten bits, bit 0 first."""
    out: list[dict[str, object]] = []
    for label, word, index in LANES:
        if word:
            bits = [f"{word}[{i}]" if verilog else f"{word}({i})" for i in range(10)]
        else:
            symbol = ctx.clock_word[-10:][::-1]  # bit 0 first
            bits = [f"1'b{b}" if verilog else f"'{b}'" for b in symbol]
        out.append(
            {
                "label": label,
                "bits": bits,
                "serial": f"serial_{label}",
                "shift1": f"shift1_{label}",
                "shift2": f"shift2_{label}",
                "p": _pin(ctx, index, "p", verilog),
                "n": _pin(ctx, index, "n", verilog),
            }
        )
    return out


def _verilog_view(ctx: SerialiserContext) -> dict[str, object]:
    rows = []
    for i, p in enumerate(ctx.ports):
        kind = "input  wire" if p.direction == "in" else "output wire"
        comma = "," if i < len(ctx.ports) - 1 else ""
        rows.append((f"{kind} {_verilog.vector(p.width).ljust(6)} {p.name}{comma}", p.comment))
    lanes = _lanes(ctx, verilog=True)
    return {
        "header": _verilog.comment_lines(ctx.header), "ports": aligned(rows, "//"),
        "lanes": lanes, "pins": _pins(ctx, lanes), "hard_lanes": _hard_lanes(ctx, verilog=True),
        "sr_zero": _verilog.uint(0, ctx.bits), "sr_range": _verilog.vector(ctx.bits),
        "phase_range": _verilog.vector(ctx.phase_width),
        "phase_zero": _verilog.uint(0, ctx.phase_width),
        "phase_one": _verilog.uint(1, ctx.phase_width),
        "phase_last": _verilog.uint(ctx.phase_last, ctx.phase_width),
        "pin_type": f"6'b{ctx.ice40_pin_type}",
    }  # fmt: skip


def _vhdl_view(ctx: SerialiserContext) -> dict[str, object]:
    rows = []
    for i, p in enumerate(ctx.ports):
        semi = ";" if i < len(ctx.ports) - 1 else ""
        rows.append((f"{p.name} : {p.direction.ljust(3)} {_vhdl.port_type(p.width)}{semi}",
                     p.comment))  # fmt: skip
    lanes = _lanes(ctx, verilog=False)
    return {
        "header": _vhdl.comment_lines(ctx.header), "ports": aligned(rows, "--"),
        "lanes": lanes, "pins": _pins(ctx, lanes), "hard_lanes": _hard_lanes(ctx, verilog=False),
        "sr_zero": _vhdl.zeros(ctx.bits), "sr_type": _vhdl.port_type(ctx.bits),
        "pin_type": f'"{ctx.ice40_pin_type}"',
    }  # fmt: skip


def render(ctx: SerialiserContext, language: str) -> str:
    """The serialiser in ``language``; ValueError names the languages on a bad one."""
    if language == "verilog":
        view, template = _verilog_view(ctx), "link/serialiser.v.j2"
    elif language == "vhdl":
        view, template = _vhdl_view(ctx), "link/serialiser.vhd.j2"
    else:
        raise ValueError(f"language must be one of {', '.join(LANGUAGES)}, got {language!r}")
    return environment().get_template(template).render(ctx=ctx, v=view)
