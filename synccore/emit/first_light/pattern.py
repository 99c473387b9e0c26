"""The first-light design: a test-pattern generator and a top level wiring it to the core.

The pattern generator (``<name>_pattern``) is one pipeline stage: it takes the
core's ``x`` and ``y`` and registers the colour of that pixel.  The top level
(``<name>_top``) lines the colour up with the syncs and de and registers every
pin once more, blanking the colour outside de:

* with ``core.lead = 1`` the colour arrives together with de and nothing is delayed;
* with ``core.lead = 0`` the top delays hsync, vsync and de by one cycle;
* with ``core.lead = L > 1`` the top delays the colour by ``L - 1`` cycles.

With ``core.pixels_per_clock = N > 1`` the generator draws the N pixels of a cycle
at once (see :mod:`synccore.model.pattern`): each colour output is one bus of
``N * bits`` bits, pixel 0 (the leftmost, at the core's ``x``) in the low bits, and
the top passes those buses to its pins unchanged.  The distinct columns of a cycle
are the *lanes*: lane ``j`` is the core's ``x`` with its low bits (always zero, as
``x`` advances by N columns) replaced by ``j``, so no adder is needed.

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
    columns_per_cycle,
    pattern_problems,
    picture_size,
    pixel_column,
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
    bus_msb: int  # top bit of the output bus: pixels_per_clock words of `bits` bits
    slices: tuple[tuple[int, int], ...]  # (msb, lsb) of each pixel's word in the bus, pixel 0 first


@dataclass(frozen=True)
class Lane:
    """One distinct picture column drawn per cycle, and the names of its signals."""

    index: int
    x: str  # the lane's column: the core's x itself when there is one lane
    bar: str  # bars: the lane's bar index
    on: str  # grid, checker, edges: 1 where the lane's pixel is white (Verilog wire)
    on_var: str  # the same as a VHDL variable


@dataclass(frozen=True)
class Pixel:
    index: int  # 0 .. pixels_per_clock - 1, left to right
    lane: Lane  # the lane whose colour it shows


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
    wide: bool  # more than one pixel per clock: the colour outputs are buses of pixels
    has_lanes: bool  # more than one distinct column per cycle: lane columns are made from x
    lanes: tuple[Lane, ...]
    pixels: tuple[Pixel, ...]  # pixel 0 first


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
    n = spec.core.pixels_per_clock
    channels = []
    for base, bits, source, sbits in (("red", spec.color.red, "x", xb), ("green", spec.color.green, "y", yb),
                                      ("blue", spec.color.blue, "x", xb)):  # fmt: skip
        take = min(bits, sbits)
        slices = tuple((bits * (i + 1) - 1, bits * i) for i in range(n))
        channels.append(Channel(p + base, base, bits, bits - 1, source, sbits, sbits - 1,
                                sbits - take, bits - take, n * bits - 1, slices))  # fmt: skip
    lanes = _lanes(spec, core)
    pixels = tuple(Pixel(i, lanes[pixel_column(0, i, spec.core.scale)]) for i in range(n))
    sync_delay, colour_delay = t.alignment_delays(PIPELINE_STAGES)
    bounds = [(f"BAR_{k}", b, k) for k, b in enumerate(bar_bounds(width), start=1)]
    header = list(header_lines(t))
    header[1] = f"Test pattern '{pattern}' for display timing core '{spec.name}'."
    packing = _packing_lines(spec, channels)
    if packing:
        header += ["", *packing]
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
        wide=n > 1,
        has_lanes=len(lanes) > 1,
        lanes=lanes,
        pixels=pixels,
    )


def _lanes(spec: Spec, core: CoreContext) -> tuple[Lane, ...]:
    count = columns_per_cycle(spec)
    if count == 1:
        return (Lane(0, core.port["x"], "bar", "on", "on_pixel"),)
    return tuple(Lane(j, f"lane{j}_x", f"lane{j}_bar", f"lane{j}_on", f"lane{j}_on")
                 for j in range(count))  # fmt: skip


def _packing_lines(spec: Spec, channels: list[Channel]) -> list[str]:
    """How the colour buses carry the pixels of a cycle (nothing at one pixel per clock)."""
    n, scale = spec.core.pixels_per_clock, spec.core.scale
    if n == 1:
        return []
    column = "x + i" if scale == 1 else f"x + i / {scale} (rounded down)"
    lines = [f"{n} pixels per clock: each colour bus carries the {n} pixels of a cycle side by",
             "side, pixel 0 (the leftmost, at the core's x) in the low bits; pixel i shows",
             f"picture column {column}."]  # fmt: skip
    for ch in channels:
        words = [f"pixel {i} in bits {msb}..{lsb}" for i, (msb, lsb) in enumerate(ch.slices)]
        shown = words if n <= 2 else [*words[:2], "...", words[-1]]
        lines.append(f"  {ch.name}: {n} x {ch.bits} bits, {', '.join(shown)}")
    return lines


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
            "lane_low": [vl.uint(lane.index, c.core.x_shift) for lane in c.lanes] if c.has_lanes else [],
        }
        return environment().get_template("first_light/pattern.v.j2").render(c=c, v=view)
    view = {
        "header": vh.comment_lines(c.header),
        "pads": {ch.base: vh.zeros(ch.pad) for ch in c.channels},
        "grid_zero": vh.zeros(GRID_BITS),
        "lane_low": [vh.bits(lane.index, c.core.x_shift) for lane in c.lanes] if c.has_lanes else [],
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
            "zeros": {ch.base: vl.uint(0, ch.bus_msb + 1) for ch in c.channels},
        }
        return environment().get_template("first_light/top.v.j2").render(c=c, v=view)
    view = {
        "header": vh.comment_lines(tuple(header)),
        "hsync_off": vh.bit(1 - t.hsync_active_level),
        "vsync_off": vh.bit(1 - t.vsync_active_level),
    }
    return environment().get_template("first_light/top.vhd.j2").render(c=c, v=view)
