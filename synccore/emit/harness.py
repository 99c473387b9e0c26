"""The measurement harness: a top level that runs a core free in the simulator.

The harness makes the clock in HDL (so the simulator runs at full speed), holds
reset for a few cycles, drives an irregular clock enable when the core has one,
delays x/y by the core's lead (as the user's pixel pipeline would), counts
advancing edges, and packs everything the measurement needs into one vector,
``mon``, that the Python side reads only when hsync, vsync or de change.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..measure import MONITOR_FIELDS
from ..model import Timing
from ..spec import Spec
from ._context import GENERATED_MARK, CoreContext, build_context
from ._jinja import environment

HARNESS_TOP = "synccore_harness"
RESET_CYCLES = 4
LFSR_SEED = 0xACE1
"""Seed of the 16-bit LFSR (x^16 + x^14 + x^13 + x^11 + 1) behind the irregular clock enable."""


@dataclass(frozen=True)
class HarnessContext:
    core: CoreContext
    top: str
    mark: str
    reset_port: str
    reset_active: int
    reset_cycles: int
    lead: int
    lead_last: int  # index of the last stage of the lead delay line
    ppc: int
    lfsr_seed: int
    fields_msb_first: tuple[tuple[str, int], ...]
    mon_width: int
    mon_msb: int


def harness_context(spec: Spec) -> HarnessContext:
    t = Timing(spec)
    core = build_context(t)
    low = spec.core.reset.endswith("_low")
    return HarnessContext(
        core=core,
        top=HARNESS_TOP,
        mark=GENERATED_MARK,
        reset_port=core.port["rst_n" if low else "rst"],
        reset_active=0 if low else 1,
        reset_cycles=RESET_CYCLES,
        lead=spec.core.lead,
        lead_last=spec.core.lead - 1,
        ppc=t.ppc,
        lfsr_seed=LFSR_SEED,
        fields_msb_first=tuple(reversed(MONITOR_FIELDS)),
        mon_width=sum(w for _, w in MONITOR_FIELDS),
        mon_msb=sum(w for _, w in MONITOR_FIELDS) - 1,
    )


def render_harness(spec: Spec, language: str) -> str:
    """The harness for ``spec``'s core in ``language`` ("verilog" or "vhdl")."""
    template = {"verilog": "harness.v.j2", "vhdl": "harness.vhd.j2"}[language]
    return environment().get_template(template).render(h=harness_context(spec))
