"""The clock wrapper's context: the family's PLL primitive with the planned settings, or a ce divider.

One language-neutral context (:class:`ClockContext`) is computed from a
:class:`~synccore.clocking.plan.ClockPlan`: the wrapper's ports, the
primitive instances with every parameter value and port connection (from
:mod:`synccore.emit.clock.primitives`), and for the no-PLL route the
divider's terminal count.  The Verilog and VHDL views
(:mod:`synccore.emit.clock.pll`) only turn values into literals of their
language.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import PurePath

from synccore._version import __version__
from synccore.clocking.plan import ClockPlan
from synccore.clocking.report import plan_facts
from synccore.clocking.solve import EnableSetting, Setting
from synccore.emit.clock.primitives import Instance, primitives
from synccore.emit.core.context import GENERATED_MARK
from synccore.model import bits_for
from synccore.units import hz


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


def _signals(plan: ClockPlan) -> dict[str, str]:
    """The wrapper's signal names by role.

    The primitive drives the internal clk_core, copied to the output port: VHDL-93
    cannot read an output port, and ECP5 feeds CLKOP back into CLKFB.
    """
    p = plan.spec.port_prefix
    return {"clk_in": p + "clk_in", "clk": "clk_core", "locked": p + "locked",
            "rst": p + "rst", "ce": p + "ce"}  # fmt: skip


def _pll_context(plan: ClockPlan, best: Setting) -> ClockContext:
    sig = _signals(plan)
    prims = primitives(plan, best, sig)
    clk = plan.spec.port_prefix + "clk"
    ports = (
        WrapperPort(sig["clk_in"], "in", f"board clock, {hz(plan.f_board)}"),
        WrapperPort(clk, "out", f"core clock, {hz(best.f_out)}"),
        WrapperPort(
            sig["locked"], "out", "1 once the PLL is locked; keep the core in reset before"
        ),
    )
    return ClockContext(
        name=module_name(plan), header=header_lines(plan), ports=ports, is_pll=True,
        instances=prims.instances, wires=(("clk_core", None), *prims.wires),
        bus_io=prims.bus_io, clk=clk, clk_in=sig["clk_in"], rst=sig["rst"], ce=sig["ce"],
        divide=1, divides=False, count_last=0, count_width=1,
    )  # fmt: skip


def _enable_context(plan: ClockPlan, best: EnableSetting) -> ClockContext:
    sig = _signals(plan)
    ports = (
        WrapperPort(sig["clk_in"], "in", f"board clock, {hz(plan.f_board)}; also the core's clock"),
        WrapperPort(sig["rst"], "in", "synchronous reset, active high"),
        WrapperPort(sig["ce"], "out", f"1 on one cycle in {best.divide}: the core's ce"),
    )
    return ClockContext(
        name=module_name(plan), header=header_lines(plan), ports=ports, is_pll=False,
        instances=(), wires=(), bus_io=False, clk=sig["clk_in"],
        clk_in=sig["clk_in"], rst=sig["rst"], ce=sig["ce"],
        divide=best.divide, divides=best.divide > 1,
        count_last=best.divide - 1, count_width=bits_for(best.divide - 1),
    )  # fmt: skip


def build_clock_context(plan: ClockPlan) -> ClockContext:
    """The wrapper's context for the plan's route (PLL when a family is set, else ce)."""
    best = plan.best
    if best is None:
        raise ValueError("the plan has no setting to emit")
    if isinstance(best, Setting):
        return _pll_context(plan, best)
    return _enable_context(plan, best)


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
