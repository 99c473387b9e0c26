"""The display bench: a top level that runs a first-light design and records its pins.

It makes the clock, resets, and writes a line to a file whenever hsync, vsync, de
or a colour changes; :mod:`synccore.picture.run` builds it and reads the file.
A line is ``<cycle> <hsync> <vsync> <de>`` and then ``<red> <green> <blue>`` of
each pixel of the cycle, pixel 0 first (one pixel, or ``pixels_per_clock`` of them).
"""

from __future__ import annotations

from fractions import Fraction

from synccore.clocking.plan import ClockPlan
from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.emit.first_light.pattern import pattern_context
from synccore.model import RESET_CYCLES
from synccore.spec import Spec
from synccore.units import fixed

BENCH = "synccore_view"


def _bench_view(spec: Spec, pattern: str) -> dict[str, object]:
    c = pattern_context(spec, pattern)
    bits = sum(ch.bus_msb + 1 for ch in c.channels)
    # One (channel, msb, lsb) per word written: the pixels in order, red, green, blue in each.
    words = [(ch.base, *ch.slices[p.index]) for p in c.pixels for ch in c.channels]
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
        "words": words,
        "pack": ["hsync", "vsync", "de", *(ch.base for ch in c.channels)],
        "pack_msb": 3 + bits - 1,
    }


def render_bench(spec: Spec, pattern: str, language: str) -> str:
    """The display bench of ``spec``'s first-light design in ``language`` ("verilog" or "vhdl")."""
    template = {"verilog": "bench/view_bench.v.j2", "vhdl": "bench/view_bench.vhd.j2"}[language]
    return environment().get_template(template).render(b=_bench_view(spec, pattern))


BOARD_BENCH = "synccore_board_view"
PLL_MODELS = "synccore_pll_models"


def render_board_bench(plan: ClockPlan, pattern: str) -> str:
    """The board bench: the board top from its clock pin, in Verilog (Icarus runs it).

    It drives the board clock at ``plan``'s board frequency and samples the pins once
    per core cycle (per ce pulse on the clock-enable route), reading the top's pixel
    clock and reset nets by their hierarchical names.
    """
    from synccore.emit.first_light.board import build_board_context

    ctx = build_board_context(plan, pattern)
    view = _bench_view(plan.spec, pattern)
    half_ns = Fraction(10**9) / (2 * plan.f_board)
    view.update(
        board=ctx.module,
        bench=BOARD_BENCH,
        board_clk=ctx.board_clk,
        reset_n=ctx.reset_n,
        pixel_clk=ctx.pixel_clk,
        sample_on_ce=ctx.ce_from_wrapper,
        f_board_text=ctx.f_board_text,
        half_period_ns=fixed(half_ns, 6),
    )
    return environment().get_template("bench/board_bench.v.j2").render(b=view)


def render_pll_models() -> str:
    """Behavioural Verilog models of the vendors' PLL primitives, for the board bench."""
    return environment().get_template("bench/pll_models.v.j2").render(mark=GENERATED_MARK)
