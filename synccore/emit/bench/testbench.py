"""Stand-alone self-checking test benches (Verilog and VHDL) for users of vendor simulators.

The bench restates the reference model (:meth:`synccore.model.Timing.outputs_at`)
as behavioural HDL from the model's numbers: it counts the positions the core
has shown since reset, once from the first active pixel and once from the
lead-shifted reset position that x/y show, works out what every output must be,
compares on every cycle, prints the first mismatches and ends with a PASS or
FAIL line.  It counts for itself (that is its independent check), but every edge
position, terminal count and start value it counts with comes from the model.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK, CoreContext, build_context
from synccore.model import LFSR_SEED, RESET_CYCLES, Timing
from synccore.spec import Spec

DEFAULT_FRAMES = 2
MAX_REPORTED = 10


@dataclass(frozen=True)
class BenchConstant:
    name: str
    value: int
    comment: str


@dataclass(frozen=True)
class TestbenchContext:
    core: CoreContext
    top: str
    mark: str
    source: str
    constants: tuple[BenchConstant, ...]
    reset_port: str
    reset_active: int
    reset_cycles: int
    max_reported: int
    frames: int
    lfsr_seed: int


def testbench_context(spec: Spec, *, frames: int = DEFAULT_FRAMES) -> TestbenchContext:
    t = Timing(spec)
    core = build_context(t)
    lead_h, lead_v = t.lead_reset
    ahead = f"{t.lead} cycle{'' if t.lead == 1 else 's'} on"
    consts = (
        BenchConstant("H_LAST", t.h_last, "last cycle of a line"),
        BenchConstant("H_ACTIVE", t.h_active, "active cycles per line"),
        BenchConstant("H_SYNC_START", t.h_sync_start, "first cycle of hsync"),
        BenchConstant("H_SYNC_STOP", t.h_sync_stop, "first cycle after hsync (not wrapped)"),
        BenchConstant("V_LAST", t.v_last, "last line of a frame"),
        BenchConstant("V_ACTIVE", t.v_active, "active lines"),
        BenchConstant("V_SYNC_FIRST", t.vsync_first,
                      "position of the first vsync leading edge after reset"),
        BenchConstant("V_SYNC_CYCLES", t.vsync_cycles, "cycles of vsync"),
        BenchConstant("FRAME_CYCLES", t.frame_cycles, "cycles per frame"),
        BenchConstant("H_LEAD_RESET", lead_h, f"column (cycles) x shows at position 0 ({ahead})"),
        BenchConstant("V_LEAD_RESET", lead_v, f"line y shows at position 0 ({ahead})"),
        BenchConstant("PIXELS_PER_CLOCK", t.ppc, "pixels per cycle"),
        BenchConstant("SCALE", spec.core.scale, "x and y are the pixel's column and row / SCALE"),
        BenchConstant("HSYNC_ON", t.hsync_active_level, "hsync level in the pulse"),
        BenchConstant("VSYNC_ON", t.vsync_active_level, "vsync level in the pulse"),
    )  # fmt: skip
    return TestbenchContext(
        core=core,
        top=f"{spec.name}_tb",
        mark=GENERATED_MARK,
        source=core.header[0],
        constants=consts,
        reset_port=core.reset_port,
        reset_active=core.reset_active,
        reset_cycles=RESET_CYCLES,
        max_reported=MAX_REPORTED,
        frames=frames,
        lfsr_seed=LFSR_SEED,
    )


def render_testbench(spec: Spec, language: str, *, frames: int = DEFAULT_FRAMES) -> str:
    """The self-checking bench of ``spec``'s core in ``language`` ("verilog" or "vhdl"),
    checking ``frames`` frames after reset."""
    template = {"verilog": "bench/testbench.v.j2", "vhdl": "bench/testbench.vhd.j2"}[language]
    return environment().get_template(template).render(b=testbench_context(spec, frames=frames))
