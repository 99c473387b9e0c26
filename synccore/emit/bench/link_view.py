"""The link bench: runs the TMDS link core ``<name>_tmds`` and records its symbols.

It makes the clock in HDL, resets, and writes one line per core cycle after reset:
the 10-bit symbols of the cycle as decimal numbers, pixel 0 first and, within a
pixel, lane 0, 1, 2; then ``end <cycles>``.  :mod:`synccore.picture.link_run`
builds it and reads the file; Python never wakes per cycle.
"""

from __future__ import annotations

from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.link.link_core import link_core_context
from synccore.model import RESET_CYCLES
from synccore.model.tmds import WORD_BITS
from synccore.spec import Spec

LINK_BENCH = "synccore_link_view"


def render_link_bench(spec: Spec, pattern: str, language: str) -> str:
    """The link bench of ``spec``'s DVI design in ``language`` ("verilog" or "vhdl")."""
    c = link_core_context(spec, pattern)
    core = c.top.core
    slices = [(word, WORD_BITS * (i + 1) - 1, WORD_BITS * i)
              for i in range(spec.core.pixels_per_clock) for word in c.words]  # fmt: skip
    view = {
        "mark": GENERATED_MARK,
        "bench": LINK_BENCH,
        "module": c.module,
        "port": core.port,
        "reset_port": core.reset_port,
        "reset_active": core.reset_active,
        "reset_cycles": RESET_CYCLES,
        "has_ce": core.has_ce,
        "words": c.words,
        "word_msb": c.word_msb,
        "slices": slices,
    }
    template = {"verilog": "bench/link_bench.v.j2", "vhdl": "bench/link_bench.vhd.j2"}[language]
    return environment().get_template(template).render(b=view)
