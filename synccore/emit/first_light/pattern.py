"""The first-light design: a test-pattern generator and a top level wiring it to the core.

The pattern generator (``<name>_pattern``) is one pipeline stage: it takes the
core's ``x`` and ``y`` and registers the colour of that pixel.  The top level
(``<name>_top``) lines the colour up with the syncs and de and registers every
pin once more, blanking the colour outside de:

* with ``core.lead = 1`` the colour arrives together with de and nothing is delayed;
* with ``core.lead = 0`` the top delays hsync, vsync and de by one cycle;
* with ``core.lead = L > 1`` the top delays the colour by ``L - 1`` cycles.

All numbers are computed here; the templates only lay them out.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.emit import _verilog as vl
from synccore.emit import _vhdl as vh
from synccore.emit._jinja import environment
from synccore.emit.core.context import CoreContext, build_context, header_lines
from synccore.errors import SpecError
from synccore.model import Timing, bits_for
from synccore.model.pattern import (
    GRID_STEP,
    PATTERNS,
    PIPELINE_STAGES,
    bar_bounds,
    pattern_problems,
    picture_size,
)
from synccore.spec import Spec

GRID_BITS = GRID_STEP.bit_length() - 1


@dataclass(frozen=True)
class Channel:
    name: str  # red | green | blue, as emitted (with the prefix)
    base: str
    bits: int
    msb: int
    source: str  # gradient: "x" or "y"
    source_bits: int  # bits of that coordinate
    take_msb: int  # gradient: top slice of the coordinate ...
    take_lsb: int  # ... down to this bit
    pad: int  # zero bits appended below when the coordinate is narrower than the channel


@dataclass(frozen=True)
class PatternContext:
    core: CoreContext
    pattern: str
    module: str
    top: str
    header: tuple[str, ...]
    flags: dict[str, bool]  # one per pattern name: which body to lay out
    channels: tuple[Channel, ...]
    bar_bounds: tuple[tuple[str, int, int], ...]  # (constant name, first column, bar index), high first
    x_last: int
    y_last: int
    grid_msb: int
    checker_bit: int
    sync_delay: int  # cycles by which the top delays hsync, vsync and de before the output stage
    colour_delay: int  # cycles by which it delays the colour
    colour_delay_last: int
    latency: int  # cycles from the core's syncs to the top's pins


def pattern_context(spec: Spec, pattern: str) -> PatternContext:
    if pattern not in PATTERNS:
        raise ValueError(f"unknown pattern {pattern!r}; choose from {', '.join(PATTERNS)}")
    problems = pattern_problems(spec)
    if problems:
        raise SpecError(problems)
    t = Timing(spec)
    core = build_context(t)
    p = spec.port_prefix
    width, height = picture_size(spec)
    xb, yb = bits_for(width - 1), bits_for(height - 1)
    channels = []
    for base, bits, source, sbits in (("red", spec.color.red, "x", xb), ("green", spec.color.green, "y", yb),
                                      ("blue", spec.color.blue, "x", xb)):  # fmt: skip
        take = min(bits, sbits)
        channels.append(Channel(p + base, base, bits, bits - 1, source, sbits, sbits - 1,
                                sbits - take, bits - take))  # fmt: skip
    sync_delay, colour_delay = t.alignment_delays(PIPELINE_STAGES)
    bounds = [(f"BAR_{k}", b, k) for k, b in enumerate(bar_bounds(width), start=1)]
    header = list(header_lines(t))
    header[1] = f"Test pattern '{pattern}' for display timing core '{spec.name}'."
    return PatternContext(
        core=core,
        pattern=pattern,
        module=f"{spec.name}_pattern",
        top=f"{spec.name}_top",
        header=tuple(header),
        flags={name: name == pattern for name in PATTERNS},
        channels=tuple(channels),
        bar_bounds=tuple(reversed(bounds)),
        x_last=width - 1,
        y_last=height - 1,
        grid_msb=GRID_BITS - 1,
        checker_bit=GRID_BITS,
        sync_delay=sync_delay,
        colour_delay=colour_delay,
        colour_delay_last=colour_delay - 1,
        latency=1 + sync_delay,
    )


def _alignment_lines(c: PatternContext) -> list[str]:
    lead = c.core.has_lead
    lines = [f"The pattern generator takes {PIPELINE_STAGES} cycle; the output stage 1 more."]
    if c.sync_delay:
        lines.append(f"core.lead is 0: hsync, vsync and de are delayed {c.sync_delay} cycle here "
                     "to meet the colour.")  # fmt: skip
    elif c.colour_delay:
        lines.append(f"core.lead exceeds the pattern's latency: the colour is delayed "
                     f"{c.colour_delay} cycles here to meet de.")  # fmt: skip
    elif lead:
        lines.append("core.lead = 1: the colour arrives with de; nothing is delayed.")
    cycles = f"{c.latency} cycle{'s' if c.latency != 1 else ''}"
    lines.append(f"The pins lag the core's syncs by {cycles}; all pins move together.")
    return lines


def _caution() -> list[str]:
    return [
        "Hardware caution: VGA colour is 0-0.7 V into 75 ohm and syncs are TTL-level;",
        "size any resistor DAC for that load and for the FPGA bank's I/O voltage, and",
        "check the parts' datasheets (FPGA, connector, panel, backlight supply) first.",
    ]


def render_pattern(spec: Spec, pattern: str, language: str) -> str:
    """The pattern generator of ``spec`` in ``language`` ("verilog" or "vhdl")."""
    c = pattern_context(spec, pattern)
    if language == "verilog":
        view = {
            "header": vl.comment_lines(c.header),
            "x_last": vl.uint(c.x_last, c.core.x_width),
            "y_last": vl.uint(c.y_last, c.core.y_width),
            "x_zero": vl.uint(0, c.core.x_width),
            "y_zero": vl.uint(0, c.core.y_width),
            "grid_zero": vl.uint(0, GRID_BITS),
            "bounds": [(n, vl.uint(b, c.core.x_width), vl.uint(k, 3)) for n, b, k in c.bar_bounds],
            "bar_zero": vl.uint(0, 3),
            "pads": {ch.base: vl.uint(0, ch.pad) if ch.pad else "" for ch in c.channels},
        }
        return environment().get_template("first_light/pattern.v.j2").render(c=c, v=view)
    view = {
        "header": vh.comment_lines(c.header),
        "pads": {ch.base: vh.zeros(ch.pad) for ch in c.channels},
        "grid_zero": vh.zeros(GRID_BITS),
    }
    return environment().get_template("first_light/pattern.vhd.j2").render(c=c, v=view)


def render_top(spec: Spec, pattern: str, language: str) -> str:
    """The top level wiring the core and the pattern generator, in ``language``."""
    c = pattern_context(spec, pattern)
    t = Timing(spec)
    header = list(c.header)
    header[1] = f"First-light top level '{c.top}': core '{spec.name}' + pattern '{pattern}'."
    header += ["", *_alignment_lines(c), "", *_caution()]
    if language == "verilog":
        view = {
            "header": vl.comment_lines(tuple(header)),
            "hsync_off": f"1'b{1 - t.hsync_active_level}",
            "vsync_off": f"1'b{1 - t.vsync_active_level}",
            "zeros": {ch.base: vl.uint(0, ch.bits) for ch in c.channels},
        }
        return environment().get_template("first_light/top.v.j2").render(c=c, v=view)
    view = {
        "header": vh.comment_lines(tuple(header)),
        "hsync_off": vh.bit(1 - t.hsync_active_level),
        "vsync_off": vh.bit(1 - t.vsync_active_level),
    }
    return environment().get_template("first_light/top.vhd.j2").render(c=c, v=view)
