"""The clock wrapper: the family's PLL primitive with the planned settings, or a ce divider.

One language-neutral context (:class:`ClockContext`) is computed from a
:class:`~synccore.clocking.plan.ClockPlan`: the wrapper's ports, the
primitive instances with every parameter value and port connection, and
for the no-PLL route the divider's terminal count.  The Verilog and VHDL
views only turn values into literals of their language; the templates
(``clock_pll.v.j2``, ``clock_pll.vhd.j2``, ``clock_enable.v.j2``,
``clock_enable.vhd.j2``) only lay them out.

Primitive names, parameter names and port names are the vendors' published
interfaces (Lattice iCE40 and ECP5 technology libraries, Xilinx UG953
7-series libraries guide, Gowin UG286, Intel's ALTPLL user guide); the
values marked "from memory" in comments are to be checked against them.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from pathlib import PurePath

from synccore._version import __version__
from synccore.clocking.plan import ClockPlan
from synccore.clocking.report import plan_facts
from synccore.clocking.solve import Setting
from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.model import bits_for
from synccore.units import fixed, hz


@dataclass(frozen=True)
class Value:
    """A parameter value or a constant port input, with its kind for literal formatting."""

    kind: str  # int | bits | str | real | level
    number: Fraction = Fraction(0)
    text: str = ""
    width: int = 1


@dataclass(frozen=True)
class Param:
    name: str
    value: Value
    comment: str = ""


@dataclass(frozen=True)
class Pin:
    """One port of a primitive: its direction and width, and a signal or constant on it."""

    name: str
    direction: str  # in | out
    width: int | None
    signal: str | None = None  # wrapper signal name
    value: Value | None = None  # constant input
    comment: str = ""


@dataclass(frozen=True)
class Instance:
    primitive: str
    label: str
    params: tuple[Param, ...]
    pins: tuple[Pin, ...]


@dataclass(frozen=True)
class WrapperPort:
    name: str
    direction: str
    comment: str


@dataclass(frozen=True)
class ClockContext:
    """Everything a clock-wrapper template needs, precomputed."""

    name: str
    header: tuple[str, ...]
    ports: tuple[WrapperPort, ...]
    is_pll: bool
    instances: tuple[Instance, ...]
    wires: tuple[tuple[str, int | None], ...]  # internal signals: name, width (None: one bit)
    bus_io: bool  # the primitive takes and gives clock buses (ALTPLL inclk/clk)
    clk: str  # the core clock output
    # the no-PLL route
    clk_in: str
    rst: str
    ce: str
    divide: int
    divides: bool  # divide > 1: a counter makes ce; otherwise ce is always 1
    count_last: int
    count_width: int


def module_name(plan: ClockPlan) -> str:
    """Name of the clock wrapper module / entity."""
    return f"{plan.spec.name}_clock"


def _int(n: int | Fraction) -> Value:
    return Value("int", Fraction(n))


def _bits(n: int | Fraction, width: int) -> Value:
    return Value("bits", Fraction(n), width=width)


def _str(text: str) -> Value:
    return Value("str", text=text)


def _real(x: int | Fraction) -> Value:
    return Value("real", Fraction(x))


def _level(bit: int, width: int | None = None) -> Value:
    return Value("level", Fraction(bit), width=width or 1)


def _in(name: str, value: Value, width: int | None = None, comment: str = "") -> Pin:
    return Pin(name, "in", width, value=value, comment=comment)


def _instances(plan: ClockPlan, s: Setting, sig: dict[str, str]) -> tuple[Instance, ...]:
    """The primitive instances of the family, wired to the wrapper signals ``sig``."""
    fam = plan.family
    assert fam is not None
    c = s.counters()
    period_ns = Fraction(10**9) / plan.f_board
    key = fam.key
    if key == "ice40":
        return (Instance("SB_PLL40_CORE", "pll", (
            Param("FEEDBACK_PATH", _str("SIMPLE"), "feedback from the VCO"),
            Param("DIVR", _bits(c["DIVR"], 4), f"input divider {s.input_ratio}"),
            Param("DIVF", _bits(c["DIVF"], 7), f"feedback multiplier {s.multiplier}"),
            Param("DIVQ", _bits(c["DIVQ"], 3), f"output divider {s.output_ratio}"),
            Param("FILTER_RANGE", _bits(s.parameters()["FILTER_RANGE"], 3),
                  f"loop filter for a {hz(s.f_pfd)} PFD (TN1251)"),
        ), (
            Pin("REFERENCECLK", "in", None, signal=sig["clk_in"], comment="board clock"),
            Pin("PLLOUTGLOBAL", "out", None, signal=sig["clk"], comment="core clock, global net"),
            Pin("LOCK", "out", None, signal=sig["locked"]),
            _in("RESETB", _level(1), comment="active-low PLL reset: held inactive"),
            _in("BYPASS", _level(0)),
        )),)  # fmt: skip
    if key == "ecp5":
        return (Instance("EHXPLLL", "pll", (
            Param("CLKI_DIV", _int(c["CLKI_DIV"]), "input divider"),
            Param("CLKFB_DIV", _int(c["CLKFB_DIV"]), "feedback divider (the multiplier)"),
            Param("CLKOP_DIV", _int(c["CLKOP_DIV"]), "VCO = CLKOP x CLKOP_DIV"),
            Param("CLKOP_ENABLE", _str("ENABLED")),
            Param("CLKOP_CPHASE", _int(c["CLKOP_DIV"] - 1),
                  "no phase shift: CLKOP_DIV - 1 (TN1263, from memory)"),
            Param("CLKOP_FPHASE", _int(0)),
            Param("FEEDBK_PATH", _str("CLKOP"), "feedback from the output"),
            Param("OUTDIVIDER_MUXA", _str("DIVA")),
        ), (
            Pin("CLKI", "in", None, signal=sig["clk_in"], comment="board clock"),
            Pin("CLKFB", "in", None, signal=sig["clk"], comment="feedback from CLKOP"),
            Pin("CLKOP", "out", None, signal=sig["clk"], comment="core clock"),
            Pin("LOCK", "out", None, signal=sig["locked"]),
            _in("RST", _level(0)),
            _in("STDBY", _level(0)),
            _in("PHASESEL0", _level(0)),
            _in("PHASESEL1", _level(0)),
            _in("PHASEDIR", _level(0)),
            _in("PHASESTEP", _level(0)),
            _in("PHASELOADREG", _level(0)),
            _in("PLLWAKESYNC", _level(0)),
            _in("ENCLKOP", _level(0)),
        )),)  # fmt: skip
    if key in ("xc7-mmcm", "xc7-pll"):
        mmcm = key == "xc7-mmcm"
        mult = "CLKFBOUT_MULT_F" if mmcm else "CLKFBOUT_MULT"
        div = "CLKOUT0_DIVIDE_F" if mmcm else "CLKOUT0_DIVIDE"
        number = _real if mmcm else _int
        pll = Instance(fam.primitive, "pll", (
            Param("BANDWIDTH", _str("OPTIMIZED")),
            Param("CLKIN1_PERIOD", _real(Fraction(fixed(period_ns, 3))),
                  f"ns: board clock {hz(plan.f_board)}"),
            Param("DIVCLK_DIVIDE", _int(c["DIVCLK_DIVIDE"]), "input divider"),
            Param(mult, number(c[mult]), "feedback multiplier"),
            Param(div, number(c[div]), "output divider"),
        ), (
            Pin("CLKIN1", "in", None, signal=sig["clk_in"], comment="board clock"),
            Pin("CLKFBIN", "in", None, signal="clk_feedback"),
            Pin("CLKFBOUT", "out", None, signal="clk_feedback",
                comment="feedback straight back (internal)"),
            Pin("CLKOUT0", "out", None, signal="clk_unbuffered"),
            Pin("LOCKED", "out", None, signal=sig["locked"]),
            _in("PWRDWN", _level(0)),
            _in("RST", _level(0)),
        ))  # fmt: skip
        bufg = Instance("BUFG", "clk_buffer", (), (
            Pin("I", "in", None, signal="clk_unbuffered"),
            Pin("O", "out", None, signal=sig["clk"], comment="core clock, global net"),
        ))  # fmt: skip
        return (pll, bufg)
    if key == "gowin":
        return (Instance("rPLL", "pll", (
            Param("FCLKIN", _str(fixed(plan.f_board / 10**6, 3).rstrip("0").rstrip(".")),
                  "board clock in MHz"),
            Param("DYN_IDIV_SEL", _str("false")),
            Param("IDIV_SEL", _int(c["IDIV_SEL"]), f"input divider {s.input_ratio}"),
            Param("DYN_FBDIV_SEL", _str("false")),
            Param("FBDIV_SEL", _int(c["FBDIV_SEL"]), f"feedback multiplier {s.multiplier}"),
            Param("DYN_ODIV_SEL", _str("false")),
            Param("ODIV_SEL", _int(c["ODIV_SEL"]), "VCO = CLKOUT x ODIV_SEL"),
            Param("CLKFB_SEL", _str("internal")),
        ), (
            Pin("CLKIN", "in", None, signal=sig["clk_in"], comment="board clock"),
            Pin("CLKOUT", "out", None, signal=sig["clk"], comment="core clock"),
            Pin("LOCK", "out", None, signal=sig["locked"]),
            _in("RESET", _level(0)),
            _in("RESET_P", _level(0)),
            _in("CLKFB", _level(0)),
            _in("FBDSEL", _level(0, 6), 6),
            _in("IDSEL", _level(0, 6), 6),
            _in("ODSEL", _level(0, 6), 6),
            _in("PSDA", _level(0, 4), 4),
            _in("DUTYDA", _level(0, 4), 4),
            _in("FDLY", _level(0, 4), 4),
        )),)  # fmt: skip
    if key == "cyclone":
        p = s.parameters()
        return (Instance("altpll", "pll", (
            Param("intended_device_family", _str("Cyclone IV E")),
            Param("lpm_type", _str("altpll")),
            Param("operation_mode", _str("NORMAL")),
            Param("compensate_clock", _str("CLK0")),
            Param("inclk0_input_frequency", _int(round(Fraction(10**12) / plan.f_board)),
                  f"ps: board clock {hz(plan.f_board)}"),
            Param("clk0_multiply_by", _int(p["clk0_multiply_by"]),
                  f"planned counters M={s.multiplier} N={s.input_ratio} C0={s.output_ratio}"),
            Param("clk0_divide_by", _int(p["clk0_divide_by"])),
            Param("clk0_duty_cycle", _int(50)),
            Param("clk0_phase_shift", _str("0")),
            Param("width_clock", _int(5)),
        ), (
            Pin("inclk", "in", 2, signal="clk_in_bus", comment="board clock on inclk[0]"),
            Pin("clk", "out", 5, signal="clk_out_bus", comment="core clock on clk[0]"),
            Pin("locked", "out", None, signal=sig["locked"]),
            _in("areset", _level(0)),
        )),)  # fmt: skip
    raise AssertionError(key)  # pragma: no cover


def build_clock_context(plan: ClockPlan) -> ClockContext:
    """The wrapper's context for the plan's route (PLL when a family is set, else ce)."""
    spec = plan.spec
    p = spec.port_prefix
    sig = {"clk_in": p + "clk_in", "clk": "clk_core", "locked": p + "locked",
           "rst": p + "rst", "ce": p + "ce"}  # fmt: skip
    # the primitive drives the internal clk_core, copied to the output port: VHDL-93
    # cannot read an output port, and ECP5 feeds CLKOP back into CLKFB.
    header = header_lines(plan)
    best = plan.best
    if best is None:
        raise ValueError("the plan has no setting to emit")
    if isinstance(best, Setting):
        instances = _instances(plan, best, sig)
        wires: list[tuple[str, int | None]] = [("clk_core", None)]
        if best.family.key in ("xc7-mmcm", "xc7-pll"):
            wires += [("clk_feedback", None), ("clk_unbuffered", None)]
        if best.family.key == "cyclone":
            wires += [("clk_in_bus", 2), ("clk_out_bus", 5)]
        ports = (
            WrapperPort(sig["clk_in"], "in", f"board clock, {hz(plan.f_board)}"),
            WrapperPort(p + "clk", "out", f"core clock, {hz(best.f_out)}"),
            WrapperPort(
                sig["locked"], "out", "1 once the PLL is locked; keep the core in reset before"
            ),
        )
        return ClockContext(
            name=module_name(plan), header=header, ports=ports, is_pll=True,
            instances=instances, wires=tuple(wires), bus_io=best.family.key == "cyclone",
            clk=p + "clk", clk_in=sig["clk_in"], rst=sig["rst"], ce=sig["ce"], divide=1,
            divides=False,
            count_last=0,
            count_width=1,
        )  # fmt: skip
    ports = (
        WrapperPort(sig["clk_in"], "in", f"board clock, {hz(plan.f_board)}; also the core's clock"),
        WrapperPort(sig["rst"], "in", "synchronous reset, active high"),
        WrapperPort(sig["ce"], "out", f"1 on one cycle in {best.divide}: the core's ce"),
    )
    return ClockContext(
        name=module_name(plan), header=header, ports=ports, is_pll=False,
        instances=(), wires=(), bus_io=False, clk=sig["clk_in"],
        clk_in=sig["clk_in"], rst=sig["rst"], ce=sig["ce"],
        divide=best.divide,
        divides=best.divide > 1,
        count_last=best.divide - 1, count_width=bits_for(best.divide - 1),
    )  # fmt: skip


def plan_lines(plan: ClockPlan) -> list[str]:
    """The plan in words, for file headers."""
    width = max(len(label) for label, _ in plan_facts(plan))
    return [f"{label.ljust(width)}  {value}" for label, value in plan_facts(plan)]


def header_lines(plan: ClockPlan, what: str = "Clock") -> tuple[str, ...]:
    """The generator mark, what the file is, and the plan in words."""
    source = PurePath(plan.spec.source).name
    return (
        f"{GENERATED_MARK} {__version__} from {source}; do not edit, regenerate instead.",
        f"{what} for display timing core '{plan.spec.name}'.",
        "",
        *plan_lines(plan),
    )


# ------------------------------------------------------------------ languages


def _verilog_literal(v: Value) -> str:
    if v.kind == "int":
        return str(int(v.number))
    if v.kind == "bits" or v.kind == "level":
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


def _aligned(rows: list[tuple[str, str]], mark: str) -> list[str]:
    if not rows:
        return []
    w = max(len(text) for text, _ in rows)
    return [f"{text.ljust(w)}  {mark} {c}".rstrip() if c else text for text, c in rows]


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
        "params": _aligned(_commas(params), mark),
        "pins": _aligned(_commas(pins), mark),
    }


def _commas(rows: list[tuple[str, str]]) -> list[tuple[str, str]]:
    return [(t + ("," if i < len(rows) - 1 else ""), c) for i, (t, c) in enumerate(rows)]


def _verilog_view(ctx: ClockContext) -> dict[str, object]:
    insts = [_instance_view(i, _verilog_literal, ".{}({})", "//") for i in ctx.instances]
    ports = [
        (f"{'input  wire' if p.direction == 'in' else 'output wire'} {p.name}"
         f"{',' if i < len(ctx.ports) - 1 else ''}", p.comment)
        for i, p in enumerate(ctx.ports)
    ]  # fmt: skip
    wires = [f"wire {'' if w is None else f'[{w - 1}:0] '}{n};" for n, w in ctx.wires]
    return {
        "header": [f"// {line}".rstrip() for line in ctx.header],
        "ports": _aligned(ports, "//"),
        "wires": wires,
        "instances": insts,
        "cyclone_in": f"{{1'b0, {ctx.clk_in}}}",
        "count_zero": f"{ctx.count_width}'d0",
        "count_one": f"{ctx.count_width}'d1",
        "count_last": f"{ctx.count_width}'d{ctx.divide - 1}",
        "count_msb": ctx.count_width - 1,
    }


def _vhdl_view(ctx: ClockContext) -> dict[str, object]:
    comps = []
    insts: list[dict[str, object]] = []
    seen: set[str] = set()
    for inst in ctx.instances:
        gw = max((len(p.name) for p in inst.params), default=0)
        generics = [f"{p.name.ljust(gw)} : {_vhdl_generic_type(p.value)}" for p in inst.params]
        pw = max(len(pin.name) for pin in inst.pins)
        cports = [
            f"{pin.name.ljust(pw)} : {pin.direction.ljust(3)} {_vhdl_port_type(pin.width)}"
            for pin in inst.pins
        ]
        if inst.primitive not in seen:
            seen.add(inst.primitive)
            comps.append({
                "primitive": inst.primitive,
                "generics": _separated(generics, ";"),
                "ports": _separated(cports, ";"),
            })  # fmt: skip
        insts.append(_instance_view(inst, _vhdl_literal, "{} => {}", "--"))
    pw = max(len(p.name) for p in ctx.ports)
    ports = [
        (f"{p.name.ljust(pw)} : {'in ' if p.direction == 'in' else 'out'} std_logic"
         f"{';' if i < len(ctx.ports) - 1 else ''}", p.comment)
        for i, p in enumerate(ctx.ports)
    ]  # fmt: skip
    wires = [f"signal {n} : {_vhdl_port_type(w)};" for n, w in ctx.wires]
    return {
        "header": [f"-- {line}".rstrip() for line in ctx.header],
        "ports": _aligned(ports, "--"),
        "wires": wires,
        "components": comps,
        "instances": insts,
        "count_last": ctx.divide - 1,
        "count_msb": ctx.count_width - 1,
    }


def render_clock_verilog(plan: ClockPlan) -> str:
    """The clock wrapper of ``plan`` as Verilog-2001 text."""
    ctx = build_clock_context(plan)
    template = "clock/clock_pll.v.j2" if ctx.is_pll else "clock/clock_enable.v.j2"
    return environment().get_template(template).render(ctx=ctx, v=_verilog_view(ctx))


def render_clock_vhdl(plan: ClockPlan) -> str:
    """The clock wrapper of ``plan`` as VHDL text (analyses under -93 and -2008)."""
    ctx = build_clock_context(plan)
    template = "clock/clock_pll.vhd.j2" if ctx.is_pll else "clock/clock_enable.vhd.j2"
    return environment().get_template(template).render(ctx=ctx, v=_vhdl_view(ctx))
