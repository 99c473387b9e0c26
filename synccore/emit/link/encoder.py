"""The TMDS encoder ``<name>_tmds_encoder``: one channel of DVI 1.0 section 3.2, as HDL.

The encoder is two pipeline stages (``ENCODER_LATENCY`` advancing cycles from an
input to its word on ``q_out``):

* stage 1 registers the transition-minimised word q_m (XOR or XNOR chain chosen by
  the count of ones of the byte), the balance of q_m[7:0] (ones minus zeros) and
  whether it has more ones or more zeros, with de, c0 and c1;
* stage 2 chooses the word (q_m straight or inverted, or the control token for C1C0)
  from the running disparity and registers it on ``q_out``.

With one pixel per clock the running disparity is a register of the encoder.  With
``pixels_per_clock`` > 1 the encoders of one channel share it: the module then
takes ``disparity_in`` and gives ``disparity_out`` (combinational, 0 after a control
token) and the caller keeps the register (see the link contract).

Every constant (the four control tokens from :data:`synccore.model.tmds.CONTROL_TOKENS`,
widths, the half of the data bits) is computed here and written as literals of the
target language; the templates only lay them out.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import PurePath

from synccore._version import __version__
from synccore.emit import _verilog as vl
from synccore.emit import _vhdl as vh
from synccore.emit._jinja import environment
from synccore.emit.core.context import GENERATED_MARK
from synccore.model.tmds import CONTROL_TOKENS, DISPARITY_BITS, DISPARITY_BOUND, WORD_BITS
from synccore.spec import Spec

ENCODER_LATENCY = 2
"""Advancing clock cycles from (de, c0, c1, d) on the inputs to its word on ``q_out``."""

DATA_BITS = 8
LANGUAGES = ("verilog", "vhdl")


@dataclass(frozen=True)
class EncoderPort:
    name: str
    direction: str  # "in" | "out"
    width: int | None  # None: a single bit
    comment: str


@dataclass(frozen=True)
class Token:
    name: str  # the constant's name, e.g. TOKEN_01
    c1: int
    c0: int
    bits: str  # the word as a binary string, bit 9 first (the last bit on the wire)
    wire_order: str  # the same bits in the order they are sent, bit 0 first


@dataclass(frozen=True)
class EncoderContext:
    """Everything the encoder templates lay out, precomputed."""

    name: str  # module / entity name
    header: tuple[str, ...]
    ports: tuple[EncoderPort, ...]
    has_ce: bool
    chained: bool  # pixels_per_clock > 1: disparity_in / disparity_out instead of a register
    tokens: tuple[Token, ...]  # C1C0 = 00, 01, 10, 11
    reset_token: str  # the constant q_out holds in reset (C1C0 = 00)
    data_bits: int
    data_msb: int
    word_msb: int
    qm_msb: int  # q_m is data_bits + 1 bits: bit data_bits says XOR (1) or XNOR (0)
    count_bits: int  # bits of a count of ones, 0 .. data_bits
    count_msb: int
    half: int  # data_bits / 2: more ones than this chooses XNOR
    disparity_bits: int
    disparity_msb: int
    disparity_bound: int
    latency: int


def encoder_module(spec: Spec) -> str:
    """The module / entity name of ``spec``'s TMDS encoder."""
    return f"{spec.name}_tmds_encoder"


def _ports(has_ce: bool, chained: bool) -> tuple[EncoderPort, ...]:
    ports = [
        EncoderPort("clk", "in", None, "core clock"),
        EncoderPort("rst", "in", None, "synchronous reset, active high"),
    ]
    if has_ce:
        ports.append(EncoderPort("ce", "in", None, "clock enable: the encoder advances only when 1"))
    ports += [
        EncoderPort("de", "in", None, "data enable: 1 sends d, 0 sends the control token for c1, c0"),
        EncoderPort("c0", "in", None, "control bit 0 (HSYNC on channel 0)"),
        EncoderPort("c1", "in", None, "control bit 1 (VSYNC on channel 0)"),
        EncoderPort("d", "in", DATA_BITS, "pixel byte"),
    ]
    if chained:
        ports += [
            EncoderPort("disparity_in", "in", DISPARITY_BITS,
                        "running disparity before this pixel (two's complement)"),
            EncoderPort("disparity_out", "out", DISPARITY_BITS,
                        "running disparity after this pixel (combinational)"),
        ]  # fmt: skip
    ports.append(EncoderPort("q_out", "out", WORD_BITS, "10-bit TMDS word, bit 0 first on the wire"))
    return tuple(ports)


def _tokens() -> tuple[Token, ...]:
    out = []
    for (c1, c0), word in sorted(CONTROL_TOKENS.items()):
        bits = format(word, f"0{WORD_BITS}b")
        out.append(Token(f"TOKEN_{c1}{c0}", c1, c0, bits, bits[::-1]))
    return tuple(out)


def _header(spec: Spec, chained: bool) -> tuple[str, ...]:
    source = PurePath(spec.source).name
    lines = [
        f"{GENERATED_MARK} {__version__} from {source}; do not edit, regenerate instead.",
        f"TMDS encoder for display timing core '{spec.name}' (DVI 1.0 section 3.2).",
        "",
        f"latency: {ENCODER_LATENCY} cycles",
        "",
        "Stage 1: transition-minimising stage (q_m, an XOR or XNOR chain chosen by",
        "         the count of ones of d) and the balance of q_m.",
        "Stage 2: DC-balancing stage (q_m straight or inverted, steered by the",
        "         running disparity) or, while de = 0, the control token for c1, c0.",
        f"The running disparity stays within -{DISPARITY_BOUND} .. +{DISPARITY_BOUND} and returns to 0",
        "in every control period.",
        "In reset q_out holds the control token for C1C0 = 00 and the disparity is 0.",
    ]
    if chained:
        lines += [
            f"{spec.core.pixels_per_clock} pixels per clock: the caller keeps the running disparity",
            "(disparity_in of pixel k is disparity_out of pixel k - 1).",
        ]
    return tuple(lines)


def encoder_context(spec: Spec) -> EncoderContext:
    """The language-neutral context of ``spec``'s encoder."""
    has_ce = spec.core.clock_enable
    chained = spec.core.pixels_per_clock > 1
    count_bits = DATA_BITS.bit_length()
    return EncoderContext(
        name=encoder_module(spec),
        header=_header(spec, chained),
        ports=_ports(has_ce, chained),
        has_ce=has_ce,
        chained=chained,
        tokens=_tokens(),
        reset_token="TOKEN_00",
        data_bits=DATA_BITS,
        data_msb=DATA_BITS - 1,
        word_msb=WORD_BITS - 1,
        qm_msb=DATA_BITS,
        count_bits=count_bits,
        count_msb=count_bits - 1,
        half=DATA_BITS // 2,
        disparity_bits=DISPARITY_BITS,
        disparity_msb=DISPARITY_BITS - 1,
        disparity_bound=DISPARITY_BOUND,
        latency=ENCODER_LATENCY,
    )


def _verilog_view(c: EncoderContext) -> dict[str, object]:
    width = max(len(vl.vector(p.width)) for p in c.ports)
    ports = []
    for i, p in enumerate(c.ports):
        registered = p.name == "q_out"
        kind = "input  wire" if p.direction == "in" else ("output reg " if registered else "output wire")
        sep = "," if i < len(c.ports) - 1 else ""
        ports.append(f"{kind} {vl.vector(p.width).ljust(width)} {p.name}{sep}".ljust(40) + f"// {p.comment}")
    return {
        "header": vl.comment_lines(c.header),
        "ports": ports,
        "tokens": [(t, f"{WORD_BITS}'b{t.bits}") for t in c.tokens],
        "half": vl.uint(c.half, c.count_bits),
        "count_zero": vl.uint(0, c.count_bits),
        "count_one_pad": f"{c.count_bits - 1}'d0",
        "disparity_zero": vl.uint(0, c.disparity_bits),
        "balance_offset": vl.uint(c.data_bits, c.disparity_bits),
        "q8_pad": f"{c.disparity_bits - 2}'d0",
        "qm_zero": vl.uint(0, c.qm_msb + 1),
    }


def _vhdl_view(c: EncoderContext) -> dict[str, object]:
    width = max(len(p.name) for p in c.ports)
    ports = []
    for i, p in enumerate(c.ports):
        sep = ";" if i < len(c.ports) - 1 else ""
        direction = "in " if p.direction == "in" else "out"
        ports.append(f"{p.name.ljust(width)} : {direction} {vh.port_type(p.width)}{sep}".ljust(52)
                     + f"-- {p.comment}")  # fmt: skip
    return {
        "header": vh.comment_lines(c.header),
        "ports": ports,
        "tokens": [(t, f'"{t.bits}"') for t in c.tokens],
        "count_max": c.data_bits,
        "disparity_low": -(1 << (c.disparity_bits - 1)),
        "disparity_high": (1 << (c.disparity_bits - 1)) - 1,
        "sum_bits": c.disparity_bits + 1,
        "sum_low": -(1 << c.disparity_bits),
        "sum_high": (1 << c.disparity_bits) - 1,
    }


def render_encoder(spec: Spec, language: str) -> str:
    """The text of ``spec``'s encoder in ``language`` ("verilog" or "vhdl")."""
    if language not in LANGUAGES:
        raise ValueError(f"unknown language {language!r}; choose from {', '.join(LANGUAGES)}")
    c = encoder_context(spec)
    if language == "verilog":
        template, view = "link/tmds_encoder.v.j2", _verilog_view(c)
    else:
        template, view = "link/tmds_encoder.vhd.j2", _vhdl_view(c)
    return environment().get_template(template).render(ctx=c, v=view)
