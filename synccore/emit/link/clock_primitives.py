"""The DVI link clock's primitives: each family's PLL instance for the serial clock, extended
with the core clock.

The serial clock comes from the same builders as a core clock wrapper
(:mod:`synccore.emit.clock.primitives`), with the PLL's main output on the serial net;
this module adds the core clock in each family's way (see
:mod:`synccore.clocking.link`): a second output with its tied divider (ECP5 CLKOS,
7 series CLKOUT1 through a second BUFG, ALTPLL clk[1]), Gowin's CLKDIV, or nothing
(iCE40: the wrapper's ce counter).
"""

from __future__ import annotations

import dataclasses
from fractions import Fraction
from typing import TypeVar

from synccore.clocking.link import LinkPlan
from synccore.clocking.solve import Setting
from synccore.emit.clock.primitives import (
    BUILDERS,
    Instance,
    Param,
    Pin,
    Primitives,
    constant_in,
    int_value,
    level_value,
    str_value,
)

SERIAL = "clk_serial_pll"
PIXEL = "clk_pixel_pll"
"""Internal nets: the PLL's serial clock output and the core clock (both before the ports)."""


T = TypeVar("T", Param, Pin)


def _insert_after(items: tuple[T, ...], name: str, new: tuple[T, ...]) -> tuple[T, ...]:
    at = [i.name for i in items].index(name) + 1
    return items[:at] + new + items[at:]


def _extend(inst: Instance, *, after_param: str, params: tuple[Param, ...], after_pin: str,
            pins: tuple[Pin, ...], comments: dict[str, str]) -> Instance:  # fmt: skip
    """``inst`` with ``params`` and ``pins`` inserted, and the named pins' comments replaced."""
    new_pins = tuple(dataclasses.replace(p, comment=comments.get(p.name, p.comment))
                     for p in _insert_after(inst.pins, after_pin, pins))  # fmt: skip
    new_params = _insert_after(inst.params, after_param, params)
    return dataclasses.replace(inst, params=new_params, pins=new_pins)


def _ecp5(plan: LinkPlan, s: Setting, base: Primitives) -> Primitives:
    div = plan.core_divider
    assert div is not None
    pll = _extend(base.instances[0], after_param="CLKOP_FPHASE", params=(
        Param("CLKOS_DIV", int_value(div), f"core clock = VCO / CLKOS_DIV = CLKOP / "
                                           f"{plan.core_factor}"),
        Param("CLKOS_ENABLE", str_value("ENABLED")),
        Param("CLKOS_CPHASE", int_value(div - 1),
              "in phase with CLKOP: CLKOS_DIV - 1 (TN1263, from memory)"),
        Param("CLKOS_FPHASE", int_value(0)),
    ), after_pin="CLKOP", pins=(
        Pin("CLKOS", "out", None, signal=PIXEL, comment="core clock"),
        constant_in("ENCLKOS", level_value(0)),
    ), comments={"CLKOP": "serial clock (5 x pixel clock)"})  # fmt: skip
    return Primitives((pll,), base.wires, base.bus_io)


def _xc7(plan: LinkPlan, s: Setting, base: Primitives) -> Primitives:
    div = plan.core_divider
    assert div is not None
    last = base.instances[0].params[-1].name
    pll = _extend(base.instances[0], after_param=last, params=(
        Param("CLKOUT1_DIVIDE", int_value(div),
              f"core clock: {plan.core_factor} x the serial divider"),
    ), after_pin="CLKOUT0", pins=(
        Pin("CLKOUT1", "out", None, signal="clk_pixel_unbuffered"),
    ), comments={})  # fmt: skip
    bufg = dataclasses.replace(base.instances[1], pins=tuple(
        dataclasses.replace(p, comment="serial clock, global net") if p.name == "O" else p
        for p in base.instances[1].pins))  # fmt: skip
    pixel_bufg = Instance("BUFG", "pixel_buffer", (), (
        Pin("I", "in", None, signal="clk_pixel_unbuffered"),
        Pin("O", "out", None, signal=PIXEL, comment="core clock, global net"),
    ))  # fmt: skip
    return Primitives((pll, bufg, pixel_bufg), (*base.wires, ("clk_pixel_unbuffered", None)))


def _gowin(plan: LinkPlan, s: Setting, base: Primitives) -> Primitives:
    div = plan.core_divider
    assert div is not None
    pll = dataclasses.replace(base.instances[0], pins=tuple(
        dataclasses.replace(p, comment="serial clock (5 x pixel clock)")
        if p.name == "CLKOUT" else p for p in base.instances[0].pins))  # fmt: skip
    clkdiv = Instance("CLKDIV", "pixel_divider", (
        Param("DIV_MODE", str_value(str(int(div))), "pixel clock = serial clock / 5"),
        Param("GSREN", str_value("false")),
    ), (
        Pin("HCLKIN", "in", None, signal=SERIAL, comment="serial clock"),
        constant_in("RESETN", level_value(1), comment="active-low reset: held inactive"),
        constant_in("CALIB", level_value(0)),
        Pin("CLKOUT", "out", None, signal=PIXEL, comment="core clock"),
    ))  # fmt: skip
    return Primitives((pll, clkdiv), base.wires, base.bus_io)


def _cyclone(plan: LinkPlan, s: Setting, base: Primitives) -> Primitives:
    assert plan.core_hz is not None
    ratio = plan.core_hz / plan.f_board
    pll = _extend(base.instances[0], after_param="clk0_phase_shift", params=(
        Param("clk1_multiply_by", int_value(ratio.numerator),
              f"core clock: counter C1 = {plan.core_divider} = {plan.core_factor} x C0"),
        Param("clk1_divide_by", int_value(ratio.denominator)),
        Param("clk1_duty_cycle", int_value(50)),
        Param("clk1_phase_shift", str_value("0")),
    ), after_pin="inclk", pins=(), comments={
        "clk": "serial clock on clk[0], core clock on clk[1]"})  # fmt: skip
    return Primitives((pll,), base.wires, base.bus_io)


def _ice40(plan: LinkPlan, s: Setting, base: Primitives) -> Primitives:
    pll = dataclasses.replace(base.instances[0], pins=tuple(
        dataclasses.replace(p, comment="serial clock, global net; also the core's clock")
        if p.name == "PLLOUTGLOBAL" else p for p in base.instances[0].pins))  # fmt: skip
    return Primitives((pll,), base.wires, base.bus_io)


_EXTEND = {"ecp5": _ecp5, "xc7-mmcm": _xc7, "xc7-pll": _xc7, "gowin": _gowin,
           "cyclone": _cyclone, "ice40": _ice40}  # fmt: skip


def link_primitives(plan: LinkPlan, signals: dict[str, str]) -> Primitives:
    """The family's instances for the plan's best setting; ``signals``: clk_in, locked."""
    s = plan.setting
    if s is None:
        raise ValueError("the link plan has no setting to emit")
    key = plan.family.key
    base = BUILDERS[key](plan.f_board, s, {**signals, "clk": SERIAL})
    return _EXTEND[key](plan, s, base)


def core_ratio(plan: LinkPlan) -> Fraction:
    """Core clock / board clock (ALTPLL's clk1 ratio), for tests and headers."""
    assert plan.core_hz is not None
    return plan.core_hz / plan.f_board
