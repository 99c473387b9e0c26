"""The vendors' clock primitives, one builder per family, with the planned settings.

Each builder turns a :class:`~synccore.clocking.solve.Setting` into the
primitive instances of its family (parameter values and port connections)
and the internal signals they need.  Values carry their kind, so the
Verilog and VHDL views can write each as a literal of their language.

Primitive names, parameter names and port names are the vendors' published
interfaces (Lattice iCE40 and ECP5 technology libraries, Xilinx UG953
7-series libraries guide, Gowin UG286, Intel's ALTPLL user guide); the
values marked "from memory" in comments are to be checked against them.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction

from synccore.clocking.families import Divider
from synccore.clocking.plan import ClockPlan
from synccore.clocking.solve import Setting
from synccore.units import fixed, hz


@dataclass(frozen=True)
class Value:
    """A parameter value or a constant port input, with its kind for literal formatting.

    ``bits`` is a parameter the vendor declares as a field of ``width`` bits
    (iCE40's divider settings); ``level`` a constant on an input port.
    """

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
class Primitives:
    """A family's instances and the internal signals that join them to the wrapper."""

    instances: tuple[Instance, ...]
    wires: tuple[tuple[str, int | None], ...] = ()  # name, width (None: one bit)
    bus_io: bool = False  # the primitive takes and gives clock buses (ALTPLL inclk/clk)


Signals = dict[str, str]
"""The wrapper's signal names by role: clk_in, clk (the internal core clock), locked."""


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


def _tied_low(*names: str) -> tuple[Pin, ...]:
    """One-bit inputs the wrapper does not use, held at 0."""
    return tuple(_in(name, _level(0)) for name in names)


# Public names of the value and pin helpers, for wrappers that extend these instances
# (the DVI link clock in synccore.emit.link.clock).
int_value, bits_value, str_value, real_value, level_value = _int, _bits, _str, _real, _level
constant_in, tied_low = _in, _tied_low


def _field(divider: Divider, counters: dict[str, int | Fraction]) -> Value:
    """A divider setting as the bit field the primitive declares."""
    assert divider.width is not None
    return _bits(counters[divider.param], divider.width)


# The width of SB_PLL40_CORE's FILTER_RANGE parameter (Lattice's sb_ice_syn.v and
# Yosys techlibs/ice40/cells_sim.v declare it 3'b000), as for the dividers in
# synccore.clocking.families.
ICE40_FILTER_RANGE_WIDTH = 3


def _ice40(f_board: Fraction, s: Setting, sig: Signals) -> Primitives:
    fam, c = s.family, s.counters()
    return Primitives((Instance("SB_PLL40_CORE", "pll", (
        Param("FEEDBACK_PATH", _str("SIMPLE"), "feedback from the VCO"),
        Param("DIVR", _field(fam.input_divider, c), f"input divider {s.input_ratio}"),
        Param("DIVF", _field(fam.multiplier, c), f"feedback multiplier {s.multiplier}"),
        Param("DIVQ", _field(fam.output_divider, c), f"output divider {s.output_ratio}"),
        Param("FILTER_RANGE", _bits(s.parameters()["FILTER_RANGE"], ICE40_FILTER_RANGE_WIDTH),
              f"loop filter for a {hz(s.f_pfd)} PFD (TN1251)"),
    ), (
        Pin("REFERENCECLK", "in", None, signal=sig["clk_in"], comment="board clock"),
        Pin("PLLOUTGLOBAL", "out", None, signal=sig["clk"], comment="core clock, global net"),
        Pin("LOCK", "out", None, signal=sig["locked"]),
        _in("RESETB", _level(1), comment="active-low PLL reset: held inactive"),
        _in("BYPASS", _level(0)),
    )),))  # fmt: skip


def _ecp5(f_board: Fraction, s: Setting, sig: Signals) -> Primitives:
    c = s.counters()
    return Primitives((Instance("EHXPLLL", "pll", (
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
        *_tied_low("RST", "STDBY", "PHASESEL0", "PHASESEL1", "PHASEDIR", "PHASESTEP",
                   "PHASELOADREG", "PLLWAKESYNC", "ENCLKOP"),
    )),))  # fmt: skip


def _xc7(f_board: Fraction, s: Setting, sig: Signals) -> Primitives:
    """MMCME2_BASE or PLLE2_BASE, its output through a BUFG onto a global net."""
    fam, c = s.family, s.counters()
    mmcm = fam.key == "xc7-mmcm"
    mult = "CLKFBOUT_MULT_F" if mmcm else "CLKFBOUT_MULT"
    div = "CLKOUT0_DIVIDE_F" if mmcm else "CLKOUT0_DIVIDE"
    number = _real if mmcm else _int
    period_ns = Fraction(10**9) / f_board
    pll = Instance(fam.primitive, "pll", (
        Param("BANDWIDTH", _str("OPTIMIZED")),
        Param("CLKIN1_PERIOD", _real(Fraction(fixed(period_ns, 3))),
              f"ns: board clock {hz(f_board)}"),
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
        *_tied_low("PWRDWN", "RST"),
    ))  # fmt: skip
    bufg = Instance("BUFG", "clk_buffer", (), (
        Pin("I", "in", None, signal="clk_unbuffered"),
        Pin("O", "out", None, signal=sig["clk"], comment="core clock, global net"),
    ))  # fmt: skip
    return Primitives((pll, bufg), wires=(("clk_feedback", None), ("clk_unbuffered", None)))


def _gowin(f_board: Fraction, s: Setting, sig: Signals) -> Primitives:
    c = s.counters()
    mhz = fixed(f_board / 10**6, 3).rstrip("0").rstrip(".")
    return Primitives((Instance("rPLL", "pll", (
        Param("FCLKIN", _str(mhz), "board clock in MHz"),
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
        *_tied_low("RESET", "RESET_P", "CLKFB"),
        *(_in(name, _level(0, width), width) for name, width in (
            ("FBDSEL", 6), ("IDSEL", 6), ("ODSEL", 6), ("PSDA", 4), ("DUTYDA", 4), ("FDLY", 4))),
    )),))  # fmt: skip


def _cyclone(f_board: Fraction, s: Setting, sig: Signals) -> Primitives:
    """ALTPLL takes the ratio; its clock ports are buses, joined to the wrapper by wires."""
    p = s.parameters()
    return Primitives((Instance("altpll", "pll", (
        Param("intended_device_family", _str("Cyclone IV E")),
        Param("lpm_type", _str("altpll")),
        Param("operation_mode", _str("NORMAL")),
        Param("compensate_clock", _str("CLK0")),
        Param("inclk0_input_frequency", _int(round(Fraction(10**12) / f_board)),
              f"ps: board clock {hz(f_board)}"),
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
    )),), wires=(("clk_in_bus", 2), ("clk_out_bus", 5)), bus_io=True)  # fmt: skip


BUILDERS: dict[str, Callable[[Fraction, Setting, Signals], Primitives]] = {
    "ice40": _ice40,
    "ecp5": _ecp5,
    "xc7-mmcm": _xc7,
    "xc7-pll": _xc7,
    "gowin": _gowin,
    "cyclone": _cyclone,
}
"""The primitive builder of each family, by family key: (board clock, setting, signals)."""


def primitives(plan: ClockPlan, s: Setting, sig: Signals) -> Primitives:
    """The family's primitive instances for setting ``s``, wired to the wrapper signals ``sig``."""
    return BUILDERS[s.family.key](plan.f_board, s, sig)
