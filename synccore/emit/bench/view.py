"""The display bench: a top level that runs a first-light design and records its pins.

It makes the clock, resets, and writes a line to a file whenever hsync, vsync, de
or a colour changes; :mod:`synccore.picture.run` builds it and reads the file.
"""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.first_light.pattern import pattern_context
from synccore.model import RESET_CYCLES
from synccore.spec import Spec

BENCH = "synccore_view"


def _bench_view(spec: Spec, pattern: str) -> dict[str, object]:
    c = pattern_context(spec, pattern)
    bits = sum(ch.bits for ch in c.channels)
    pad = 32 - 3 - bits
    names = ", ".join(ch.base for ch in c.channels)
    return {
        "mark": GENERATED_MARK,
        "top": c.top,
        "bench": BENCH,
        "port": c.core.port,
        "reset_port": c.core.reset_port,
        "reset_active": c.core.reset_active,
        "reset_cycles": RESET_CYCLES,
        "has_ce": c.core.has_ce,
        "channels": c.channels,
        "pack_verilog": (f"{pad}'d0, " if pad else "") + f"hsync, vsync, de, {names}",
        "pack_vhdl": "hsync & vsync & de & " + " & ".join(ch.base for ch in c.channels),
        "pack_msb": 3 + bits - 1,
        "channel_args": names,
    }


def render_bench(spec: Spec, pattern: str, language: str) -> str:
    """The display bench of ``spec``'s first-light design in ``language`` ("verilog" or "vhdl")."""
    template = {"verilog": "bench/view_bench.v.j2", "vhdl": "bench/view_bench.vhd.j2"}[language]
    return environment().get_template(template).render(b=_bench_view(spec, pattern))
