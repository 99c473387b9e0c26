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
from synccore.model import LFSR_SEED, RESET_CYCLES, Timing, monitor_fields
from synccore.spec import Spec

HARNESS_TOP = "synccore_harness"


@dataclass(frozen=True)
class HarnessContext:
    core: CoreContext
    top: str
    mark: str
    reset_port: str
    reset_active: int
    reset_cycles: int
    lead: int  # stages of the delay line: the pixel pipeline's latency
    lead_last: int  # index of the delay line's last stage
    check_from: int  # x/y steps are judged once more than this many edges have advanced
    ppc: int
    x_step: int  # growth of x per cycle inside a de run; 0: holds, then grows by 1 (scaled)
    lfsr_seed: int
    event_format: str  # Verilog $fwrite format of one event line
    event_args: str  # its arguments
    vhdl_event_items: tuple[str, ...]  # VHDL write() arguments of one event line


def harness_context(spec: Spec) -> HarnessContext:
    t = Timing(spec)
    core = build_context(t)
    return HarnessContext(
        core=core,
        top=HARNESS_TOP,
        mark=GENERATED_MARK,
        reset_port=core.reset_port,
        reset_active=core.reset_active,
        reset_cycles=RESET_CYCLES,
        lead=t.lead,
        lead_last=t.lead - 1,
        check_from=t.xy_steps_judged_after,
        ppc=t.ppc,
        x_step=t.x_step,
        lfsr_seed=LFSR_SEED,
        event_format=" ".join("%0d" for _ in monitor_fields(t.interlaced)),
        event_args=", ".join(_VERILOG_SOURCE[name] for name, _ in monitor_fields(t.interlaced)),
        vhdl_event_items=_vhdl_items(t.interlaced),
    )


# Harness signal behind each monitored field.
_VERILOG_SOURCE = {
    "adv": "adv", "hsync": "hsync", "vsync": "vsync", "de": "de", "hblank": "hblank",
    "vblank": "vblank", "frame_start": "frame_start",
    "line_start": "line_start", "x": "x_d", "y": "y_d", "x_last": "x_last",
    "step_faults": "step_faults", "line_starts": "line_starts", "frame_starts": "frame_starts",
    "field": "field",
}  # fmt: skip
_VHDL_SOURCE = {
    "adv": "adv", "hsync": "as_int(hsync)", "vsync": "as_int(vsync)", "de": "as_int(de)",
    "hblank": "as_int(hblank)", "vblank": "as_int(vblank)",
    "frame_start": "as_int(frame_start)", "line_start": "as_int(line_start)",
    "x": "x_d", "y": "y_d", "x_last": "x_last", "step_faults": "step_faults",
    "line_starts": "line_starts", "frame_starts": "frame_starts", "field": "as_int(field)",
}  # fmt: skip


def _vhdl_items(interlaced: bool) -> tuple[str, ...]:
    items: list[str] = []
    for i, (name, _) in enumerate(monitor_fields(interlaced)):
        if i:
            items.append("string'(\" \")")
        items.append(_VHDL_SOURCE[name])
    return tuple(items)


def render_harness(spec: Spec, language: str) -> str:
    """The harness for ``spec``'s core in ``language`` ("verilog" or "vhdl")."""
    template = {"verilog": "bench/harness.v.j2", "vhdl": "bench/harness.vhd.j2"}[language]
    return environment().get_template(template).render(h=harness_context(spec))
