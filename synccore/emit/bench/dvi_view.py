"""The serial DVI bench: the DVI top ``<name>_dvi`` from its board clock pin to the TMDS pins.

It drives the board clock, samples the TMDS pins a quarter serial period after every edge
of the serial clock (the middle of each bit a DDR output drives) and writes each lane's
bits packed ten to a line, one line per pixel period, without knowing where a symbol
starts; plus the times it measured the serial and core clocks on and a count of samples
where an ``_n`` pin was not the inverse of its ``_p`` pin.  Icarus runs it with the PLL
models (``bench/pll_models.v.j2``) and the I/O models (``bench/io_models.v.j2``);
:mod:`synccore.picture.link_serial` reads the file.
"""

from __future__ import annotations

from fractions import Fraction

from synccore.clocking.link import LinkPlan
from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.link.dvi_top import build_dvi_context
from synccore.units import fixed, hz

DVI_BENCH = "synccore_dvi_view"

SKIP_SERIAL_CYCLES = 40
"""Serial clock cycles left out after the core leaves reset: the serialiser's first words
(zeros from reset) are not pictures (8 pixel periods at 1 pixel per clock)."""


def render_dvi_bench(plan: LinkPlan, pattern: str) -> str:
    """The serial DVI bench of ``plan``'s DVI top with ``pattern``, in Verilog (Icarus runs it)."""
    if plan.serial_hz is None:
        raise ValueError("the link plan has no setting to simulate")
    c = build_dvi_context(plan, pattern)
    view = {
        "mark": GENERATED_MARK,
        "bench": DVI_BENCH,
        "module": c.module,
        "board_clk": c.board_clk,
        "reset_n": c.reset_n,
        "pins": c.pins,
        "reset_active": c.link.top.core.reset_active,
        "count_ce": c.single_clock,
        "skip": SKIP_SERIAL_CYCLES,
        "f_board_text": hz(plan.f_board),
        "half_period_ns": fixed(Fraction(10**9) / (2 * plan.f_board), 6),
        "quarter_ns": fixed(Fraction(10**9) / (4 * plan.serial_hz), 6),
    }
    return environment().get_template("bench/dvi_bench.v.j2").render(b=view)
