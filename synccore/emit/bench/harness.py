"""The measurement harness: a top level that runs a core free in the simulator.

The harness makes the clock in HDL (so the simulator runs at full speed), holds
reset for a few cycles, drives an irregular clock enable when the core has one,
delays x/y by the core's lead (as the user's pixel pipeline would), counts
advancing edges, and writes a line of every monitored value to an event file whenever hsync,
vsync or de changes.  Python reads the file after the run: it never wakes
per clock cycle, so the simulator runs at its free-running speed.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK, CoreContext, build_context
from synccore.model import Timing
from synccore.spec import Spec
from synccore.verification.measure import MONITOR_FIELDS

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
    check_from: int  # x/y steps are judged from this advancing edge on (lead + 1)
    ppc: int
    x_step: int  # growth of x per cycle inside a de run; 0: holds, then grows by 1 (scaled)
    lfsr_seed: int
    event_format: str  # Verilog $fwrite format of one event line
    event_args: str  # its arguments
    vhdl_event_items: tuple[str, ...]  # VHDL write() arguments of one event line


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
        check_from=spec.core.lead + 1,
        ppc=t.ppc,
        x_step=t.x_step,
        lfsr_seed=LFSR_SEED,
        event_format=" ".join("%0d" for _ in MONITOR_FIELDS),
        event_args=", ".join(_VERILOG_SOURCE[name] for name, _ in MONITOR_FIELDS),
        vhdl_event_items=_vhdl_items(),
    )


# Harness signal behind each monitored field.
_VERILOG_SOURCE = {
    "adv": "adv", "hsync": "hsync", "vsync": "vsync", "de": "de", "hblank": "hblank",
    "vblank": "vblank", "frame_start": "frame_start",
    "line_start": "line_start", "x": "x_d", "y": "y_d", "x_last": "x_last",
    "step_faults": "step_faults", "line_starts": "line_starts", "frame_starts": "frame_starts",
}  # fmt: skip
_VHDL_SOURCE = {
    "adv": "adv", "hsync": "as_int(hsync)", "vsync": "as_int(vsync)", "de": "as_int(de)",
    "hblank": "as_int(hblank)", "vblank": "as_int(vblank)",
    "frame_start": "as_int(frame_start)", "line_start": "as_int(line_start)",
    "x": "x_d", "y": "y_d", "x_last": "x_last", "step_faults": "step_faults",
    "line_starts": "line_starts", "frame_starts": "frame_starts",
}  # fmt: skip


def _vhdl_items() -> tuple[str, ...]:
    items: list[str] = []
    for i, (name, _) in enumerate(MONITOR_FIELDS):
        if i:
            items.append("string'(\" \")")
        items.append(_VHDL_SOURCE[name])
    return tuple(items)


def render_harness(spec: Spec, language: str) -> str:
    """The harness for ``spec``'s core in ``language`` ("verilog" or "vhdl")."""
    template = {"verilog": "bench/harness.v.j2", "vhdl": "bench/harness.vhd.j2"}[language]
    return environment().get_template(template).render(h=harness_context(spec))
