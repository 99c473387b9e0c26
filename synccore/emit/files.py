"""The files a build writes: rendered in memory, then written all or nothing, only inside the
output folder, replacing only files synccore wrote (:mod:`synccore.emit.writing`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from synccore.clocking.link import LinkPlan
from synccore.clocking.plan import ClockPlan
from synccore.emit import render_verilog, render_vhdl
from synccore.emit.clock.constraints import constraint_suffix, render_constraints
from synccore.emit.clock.pll import module_name, render_clock_verilog, render_clock_vhdl
from synccore.emit.writing import write_files
from synccore.errors import Problem, SpecError
from synccore.spec import Spec

Renderer = Callable[[Spec], str]

CORE_FILES: tuple[tuple[str, Renderer], ...] = (
    (".v", render_verilog),
    (".vhd", render_vhdl),
)


@dataclass(frozen=True)
class Artifact:
    """One file to write: its name inside the output folder and its full text."""

    name: str
    text: str


def core_artifacts(spec: Spec) -> list[Artifact]:
    """The core in every target language."""
    return [Artifact(spec.name + suffix, render(spec)) for suffix, render in CORE_FILES]


def only_core(spec: Spec, more: bool) -> None:
    """Raise :class:`SpecError` when files beyond the core (``more``) are asked of a multi-mode
    spec: it has no test benches, test pattern, clock or link files yet."""
    if spec.modes and more:
        raise SpecError([Problem(spec.location("modes"), "modes",
                                 "a multi-mode spec builds its core only yet: no test benches, test "
                                 "pattern, clock or link files; build without those")])  # fmt: skip


def clock_artifacts(plan: ClockPlan) -> list[Artifact]:
    """The clock wrapper in every target language, and its timing constraints."""
    name = module_name(plan)
    return [
        Artifact(name + ".v", render_clock_verilog(plan)),
        Artifact(name + ".vhd", render_clock_vhdl(plan)),
        Artifact(name + constraint_suffix(plan), render_constraints(plan)),
    ]


def testbench_artifacts(spec: Spec) -> list[Artifact]:
    """Self-checking stand-alone test benches, one per language."""
    from synccore.emit.bench.testbench import render_testbench

    return [
        Artifact(f"{spec.name}_tb.v", render_testbench(spec, "verilog")),
        Artifact(f"{spec.name}_tb.vhd", render_testbench(spec, "vhdl")),
    ]


def pattern_artifacts(spec: Spec, pattern: str) -> list[Artifact]:
    """The test-pattern generator and the first-light top level, in every target language."""
    from synccore.emit.first_light.pattern import render_pattern, render_top

    return [
        Artifact(f"{spec.name}_pattern.v", render_pattern(spec, pattern, "verilog")),
        Artifact(f"{spec.name}_pattern.vhd", render_pattern(spec, pattern, "vhdl")),
        Artifact(f"{spec.name}_top.v", render_top(spec, pattern, "verilog")),
        Artifact(f"{spec.name}_top.vhd", render_top(spec, pattern, "vhdl")),
    ]


def board_artifacts(plan: ClockPlan, pattern: str) -> list[Artifact]:
    """The board top (clock pin to display pins) in every language, its pin file and timing.

    Needs the pattern and clock artifacts beside it: it instantiates ``<name>_clock``
    and ``<name>_top``.  The clock-enable route has no pin file (no family is named);
    for the 7 series the pin file (``.xdc``) carries the timing too.
    """
    from synccore.emit.first_light.board import board_module, render_board
    from synccore.emit.first_light.board_pins import (
        pin_suffix,
        render_pins,
        render_timing,
        timing_suffix,
    )

    name = board_module(plan)
    out = [
        Artifact(name + ".v", render_board(plan, pattern, "verilog")),
        Artifact(name + ".vhd", render_board(plan, pattern, "vhdl")),
    ]
    pins = pin_suffix(plan)
    if pins is not None:
        out.append(Artifact(name + pins, render_pins(plan, pattern)))
    timing = timing_suffix(plan)
    if timing is not None:
        out.append(Artifact(name + timing, render_timing(plan, pattern)))
    return out


def link_artifacts(spec: Spec, pattern: str) -> list[Artifact]:
    """The TMDS encoder and the link core ``<name>_tmds`` (first-light top -> encoders)."""
    from synccore.emit.link.encoder import encoder_module, render_encoder
    from synccore.emit.link.link_core import link_core_module, render_link_core

    enc, core = encoder_module(spec), link_core_module(spec)
    return [
        Artifact(enc + ".v", render_encoder(spec, "verilog")),
        Artifact(enc + ".vhd", render_encoder(spec, "vhdl")),
        Artifact(core + ".v", render_link_core(spec, pattern, "verilog")),
        Artifact(core + ".vhd", render_link_core(spec, pattern, "vhdl")),
    ]


def dvi_artifacts(plan: LinkPlan, pattern: str) -> list[Artifact]:
    """The DVI design for ``plan``'s family: encoder, link core, serialiser, link clock and its
    constraints, the DVI top ``<name>_dvi`` and its pin file (the core and the first-light
    files come from :func:`core_artifacts` and :func:`pattern_artifacts`)."""
    from synccore.emit.link.clock import link_constraint_suffix, render_link_clock, render_link_constraints
    from synccore.emit.link.dvi_pins import dvi_pin_suffix, render_dvi_pins
    from synccore.emit.link.dvi_top import dvi_module, render_dvi_top
    from synccore.emit.link.serialiser import render_serialiser

    spec, key = plan.spec, plan.family.key
    name, top = spec.name, dvi_module(plan)
    out = link_artifacts(spec, pattern)
    out += [
        Artifact(f"{name}_serialiser.v", render_serialiser(spec, key, "verilog")),
        Artifact(f"{name}_serialiser.vhd", render_serialiser(spec, key, "vhdl")),
        Artifact(f"{name}_link_clock.v", render_link_clock(plan, "verilog")),
        Artifact(f"{name}_link_clock.vhd", render_link_clock(plan, "vhdl")),
        Artifact(top + ".v", render_dvi_top(plan, pattern, "verilog")),
        Artifact(top + ".vhd", render_dvi_top(plan, pattern, "vhdl")),
    ]
    board_port = spec.port_prefix + "board_clk"
    constraints = Artifact(top + link_constraint_suffix(plan),
                           render_link_constraints(plan, board_port=board_port))
    pins = Artifact(top + dvi_pin_suffix(key), render_dvi_pins(spec, key, f_board=plan.f_board))
    if pins.name == constraints.name:  # the 7 series: one .xdc carries pins and timing
        return out + [Artifact(pins.name, pins.text + "\n" + constraints.text)]
    return out + [constraints, pins]


def write_artifacts(artifacts: list[Artifact], out_dir: str | Path, *, force: bool = False,
                    notes: list[str] | None = None) -> list[Path]:  # fmt: skip
    """Write every artifact into ``out_dir`` or none of them (:mod:`synccore.emit.writing`)."""
    files = {a.name: a.text.encode("utf-8") for a in artifacts}
    return write_files(files, out_dir, force=force, notes=notes)
