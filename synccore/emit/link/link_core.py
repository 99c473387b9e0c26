"""The link core ``<name>_tmds``: the first-light design with its colour, syncs and de TMDS-encoded.

It instantiates the first-light top level ``<name>_top`` (core, pattern generator,
alignment, registered pins), brings each colour to the 8 bits TMDS carries, and feeds
three encoders ``<name>_tmds_encoder`` per pixel of a cycle:

=========  ======  ==========================
channel    byte    C0 / C1
=========  ======  ==========================
0          blue    HSYNC / VSYNC
1          green   0 / 0
2          red     0 / 0
=========  ======  ==========================

(DVI 1.0, section 3.2: channel 0 carries the syncs; DVI signalling, which HDMI sinks
accept.)  The words ``tmds0``, ``tmds1``, ``tmds2`` carry channel 0, 1, 2, pixel 0 of
the cycle in bits 9..0, bit 0 first on the wire.  Colour, syncs and de leave
``<name>_top`` aligned (by the core's ``lead``, as the VGA top states) and pass the
encoders together, so they stay aligned.

A colour of fewer than 8 bits is scaled as :func:`synccore.model.tmds.eight_bit` says
(a table per channel, precomputed here), the scale the simulated monitor draws with.
With ``pixels_per_clock`` > 1 the encoders of a channel are chained: the running
disparity passes from one to the next within the cycle, and one register per
channel keeps it from cycle to cycle.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.emit import _verilog as vl
from synccore.emit import _vhdl as vh
from synccore.emit._jinja import environment
from synccore.emit.first_light.pattern import Channel, PatternContext, pattern_context
from synccore.emit.link.encoder import ENCODER_LATENCY, encoder_module
from synccore.model.tmds import DISPARITY_BITS, WORD_BITS, eight_bit
from synccore.spec import Spec

TMDS_CHANNELS = ("blue", "green", "red")
"""The colour each TMDS channel carries, channel 0 first (DVI 1.0, section 3.2)."""


@dataclass(frozen=True)
class Encoder:
    """One encoder instance: channel ``channel``, pixel ``pixel`` of the cycle."""

    label: str  # instance name
    channel: int
    pixel: int
    colour: str  # the top's colour output it encodes (with the prefix)
    level_msb: int  # that pixel's slice of the colour bus
    level_lsb: int
    d: str  # the 8-bit byte signal
    q_msb: int  # its slice of the channel's word
    q_lsb: int
    carries_syncs: bool
    disparity_in: str  # the chained disparity signals (ppc > 1)
    disparity_out: str


@dataclass(frozen=True)
class Scale:
    """A channel's colour scaling to 8 bits: a table of (level, byte), or none for 8 bits."""

    base: str
    bits: int
    msb: int  # bits - 1
    table: tuple[tuple[int, int], ...]  # empty when bits == 8


@dataclass(frozen=True)
class LinkCoreContext:
    module: str
    encoder: str
    header: tuple[str, ...]
    top: PatternContext
    word_msb: int  # 10 * ppc - 1
    words: tuple[str, str, str]
    scales: tuple[Scale, ...]
    encoders: tuple[Encoder, ...]
    chained: bool
    last_of_channel: tuple[str, str, str]  # the disparity_out of each channel's last encoder
    disparity_msb: int
    reset_inverted: bool  # the core's reset is active low: the encoders get its inverse
    latency: int


def link_core_module(spec: Spec) -> str:
    return f"{spec.name}_tmds"


def _channel(top: PatternContext, base: str) -> Channel:
    return next(ch for ch in top.channels if ch.base == base)


def link_core_context(spec: Spec, pattern: str) -> LinkCoreContext:
    """Everything the link core's templates lay out, for ``spec``'s first-light ``pattern``."""
    top = pattern_context(spec, pattern)
    n = spec.core.pixels_per_clock
    scales = []
    encoders = []
    for k, base in enumerate(TMDS_CHANNELS):
        ch = _channel(top, base)
        table = () if ch.bits == 8 else tuple((v, eight_bit(v, ch.bits)) for v in range(1 << ch.bits))
        scales.append(Scale(base, ch.bits, ch.bits - 1, table))
        for i in range(n):
            msb, lsb = ch.slices[i]
            encoders.append(Encoder(
                label=f"encoder{k}_{i}", channel=k, pixel=i, colour=ch.name, level_msb=msb,
                level_lsb=lsb, d=f"byte{k}_{i}", q_msb=WORD_BITS * (i + 1) - 1, q_lsb=WORD_BITS * i,
                carries_syncs=k == 0,
                disparity_in=f"disparity{k}" if i == 0 else f"disparity{k}_{i - 1}",
                disparity_out=f"disparity{k}_{i}"))  # fmt: skip
    latency = top.latency + ENCODER_LATENCY
    return LinkCoreContext(
        module=link_core_module(spec),
        encoder=encoder_module(spec),
        header=_header(spec, top, pattern, latency),
        top=top,
        word_msb=WORD_BITS * n - 1,
        words=("tmds0", "tmds1", "tmds2"),
        scales=tuple(scales),
        encoders=tuple(encoders),
        chained=n > 1,
        last_of_channel=tuple(f"disparity{k}_{n - 1}" for k in range(3)),  # type: ignore[arg-type]
        disparity_msb=DISPARITY_BITS - 1,
        reset_inverted=top.core.reset_active == 0,
        latency=latency,
    )


def _header(spec: Spec, top: PatternContext, pattern: str, latency: int) -> tuple[str, ...]:
    n = spec.core.pixels_per_clock
    lines = [
        top.header[0],
        f"TMDS link core '{spec.name}_tmds': first-light top '{top.top}' (pattern '{pattern}')",
        f"-> colour to 8 bits -> {3 * n} TMDS encoders '{spec.name}_tmds_encoder'.",
        "",
        "tmds0: channel 0, blue, C0 = HSYNC, C1 = VSYNC; tmds1: channel 1, green; tmds2:",
        "channel 2, red (C0 = C1 = 0 on channels 1 and 2: DVI 1.0 section 3.2; HDMI sinks",
        "accept this DVI signalling).  Bit 0 of each 10-bit symbol goes first on the wire.",
    ]
    if n > 1:
        lines += [f"{n} pixels per clock: pixel i of the cycle in bits {WORD_BITS}*i+9..{WORD_BITS}*i "
                  "of each word; the", "encoders of a channel pass the running disparity along within "
                  "the cycle."]  # fmt: skip
    lines += [
        "",
        f"Alignment: colour, syncs and de leave '{top.top}' aligned (its header says how",
        f"core.lead does it) and pass the encoders together. latency: {latency} cycles from",
        f"the core's syncs to the words ({top.latency} in '{top.top}', {ENCODER_LATENCY} in the encoders).",
    ]
    bits = {ch.base: ch.bits for ch in top.channels}
    scaled = [f"{b} {bits[b]} bits" for b in TMDS_CHANNELS if bits[b] != 8]
    if scaled:
        lines.append("Colour scaled to 8 bits as round(level * 255 / (2^bits - 1)): "
                     + ", ".join(scaled) + ".")
    return tuple(lines)


def render_link_core(spec: Spec, pattern: str, language: str) -> str:
    """The link core of ``spec`` with ``pattern`` in ``language`` ("verilog" or "vhdl")."""
    c = link_core_context(spec, pattern)
    if language == "verilog":
        view = {
            "header": vl.comment_lines(c.header),
            "tables": {s.base: [(vl.uint(v, s.bits), vl.uint(b, 8)) for v, b in s.table] for s in c.scales},
            "disparity_zero": vl.uint(0, DISPARITY_BITS),
        }
        return environment().get_template("link/tmds_core.v.j2").render(c=c, v=view)
    view = {
        "header": vh.comment_lines(c.header),
        "tables": {s.base: [(vh.bits(v, s.bits), vh.bits(b, 8)) for v, b in s.table] for s in c.scales},
    }
    return environment().get_template("link/tmds_core.vhd.j2").render(c=c, v=view)

