"""Writing an EDID for a display synccore users build: specs in, EDID 1.4 bytes out.

:func:`build` lays out a base block (VESA E-EDID 1.4; section numbers from memory) with
the specs' timings as detailed timing descriptors (the first is the preferred timing), a
monitor name and range limits derived from the timings, and, when asked, a CTA-861
extension (version 3) listing the VICs of the specs that are CTA formats and carrying
the timings that did not fit the base block.  :func:`hex_dump` and :func:`readmemh` give
the bytes as text; :mod:`synccore.emit.edid_rom` writes them as a VHDL constant.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from fractions import Fraction

from synccore.spec import Axis, Spec
from synccore.timings import modes
from synccore.timings._edid_blocks import DTD_LENGTH, PIXEL_CLOCK_UNIT_HZ
from synccore.timings.edid import BLOCK, CTA_TAG, HEADER

__all__ = ["EdidWriteError", "build", "cta_vics", "dtd", "hex_dump", "readmemh"]

DEFAULT_MANUFACTURER = "SYC"
"""Placeholder manufacturer letters; a product must use its own PNP ID (E-EDID 1.4 3.4.1)."""

SRGB_PRIMARIES = ((0.640, 0.330), (0.300, 0.600), (0.150, 0.060), (0.3127, 0.3290))
"""Red, green, blue and white x/y of sRGB (IEC 61966-2-1; from memory)."""

BASE_TIMING_SLOTS = 2
"""Descriptors 1-2 carry timings; 3 is the name, 4 the range limits (E-EDID 1.4 3.10)."""


class EdidWriteError(ValueError):
    """A timing or a request that an EDID cannot carry; ``str()`` is one line."""


def _limit(value: int, bits: int, what: str, spec: str) -> int:
    if not 0 <= value < 1 << bits:
        raise EdidWriteError(f"{spec}: {what} {value} does not fit the detailed timing "
                             f"descriptor's {bits} bits (E-EDID 1.4 section 3.10.2)")  # fmt: skip
    return value


def _flags(h: Axis, v: Axis, interlaced: bool) -> int:
    """Byte 17: bit 7 interlaced (vertical figures then per field), no stereo, digital
    separate sync (bits 4-3 = 11), bit 2 vsync and bit 1 hsync polarity, 1 = positive
    (E-EDID 1.4 section 3.10.2, Table 3.22)."""
    return (0x80 if interlaced else 0) | 0x18 | (0x04 if v.sync_polarity == "positive" else 0) | (
        0x02 if h.sync_polarity == "positive" else 0)  # fmt: skip


def dtd(spec: Spec) -> bytes:
    """A detailed timing descriptor for ``spec`` (E-EDID 1.4 section 3.10.2, Table 3.21).

    The pixel clock is stored in 10 kHz steps: it is rounded to the nearest step.
    """
    h, v, who = spec.horizontal, spec.vertical, spec.name
    clock = _limit(math.floor(spec.pixel_clock_hz / PIXEL_CLOCK_UNIT_HZ + Fraction(1, 2)),
                   16, "pixel clock (10 kHz steps)", who)  # fmt: skip
    if clock == 0:
        raise EdidWriteError(f"{who}: a pixel clock under 5 kHz is stored as 0 (section 3.10.2)")
    ha, hb = _limit(h.active, 12, "horizontal active", who), _limit(h.blanking, 12,
                                                                   "horizontal blanking", who)
    va, vb = _limit(v.active, 12, "vertical active", who), _limit(v.blanking, 12,
                                                                 "vertical blanking", who)
    hf, hs = _limit(h.front_porch, 10, "horizontal front porch", who), _limit(
        h.sync, 10, "horizontal sync", who)
    vf, vs = _limit(v.front_porch, 6, "vertical front porch", who), _limit(
        v.sync, 6, "vertical sync", who)
    return bytes([
        clock & 0xFF, clock >> 8, ha & 0xFF, hb & 0xFF, (ha >> 8) << 4 | hb >> 8,
        va & 0xFF, vb & 0xFF, (va >> 8) << 4 | vb >> 8, hf & 0xFF, hs & 0xFF,
        (vf & 0x0F) << 4 | vs & 0x0F,
        (hf >> 8) << 6 | (hs >> 8) << 4 | (vf >> 4) << 2 | vs >> 4,
        0, 0, 0,  # image size in mm unknown (bytes 12-14)
        0, 0,  # no border (bytes 15-16)
        _flags(h, v, spec.interlaced),
    ])  # fmt: skip


def _text_descriptor(tag: int, text: str) -> bytes:
    """A display descriptor carrying text: 13 bytes, 0Ah after the text, then 20h
    (E-EDID 1.4 sections 3.10.3.2 and 3.10.3.4)."""
    body = text.encode("ascii", "replace")[:13]
    if len(body) < 13:
        body += b"\x0a" + b"\x20" * (12 - len(body))
    return bytes([0, 0, 0, tag, 0]) + body


def _range_descriptor(specs: Sequence[Spec]) -> bytes:
    """Display range limits (tag FDh, E-EDID 1.4 section 3.10.3.3) spanning the timings,
    byte 10 = 01h: range limits only, no formula (Table 3.27)."""
    lines = [s.pixel_clock_hz / s.horizontal.total for s in specs]
    frames = [r / s.vertical.total for r, s in zip(lines, specs, strict=True)]
    v_min, v_max = max(1, math.floor(min(frames))), math.ceil(max(frames))
    h_min, h_max = max(1, math.floor(min(lines) / 1000)), math.ceil(max(lines) / 1000)
    clock = math.ceil(max(s.pixel_clock_hz for s in specs) / 10_000_000)
    offsets = 0
    if v_max > 255:
        offsets, v_max = offsets | 0x02, v_max - 255
    if h_max > 255:
        offsets, h_max = offsets | 0x08, h_max - 255
    if v_min > 255 or h_min > 255 or clock > 255:
        raise EdidWriteError("range limits: a timing is too fast for the range limits "
                             "descriptor (section 3.10.3.3)")  # fmt: skip
    return bytes([0, 0, 0, 0xFD, offsets, v_min, v_max, h_min, h_max, clock, 0x01, 0x0A]
                 + [0x20] * 6)  # fmt: skip


def _manufacturer(code: str) -> bytes:
    """Three letters A-Z as 5-bit codes, 1 = A (E-EDID 1.4 section 3.4.1)."""
    if len(code) != 3 or not all("A" <= c <= "Z" for c in code):
        raise EdidWriteError(f"manufacturer must be three letters A-Z, got {code!r}")
    word = sum((ord(c) - ord("A") + 1) << s for c, s in zip(code, (10, 5, 0), strict=True))
    return word.to_bytes(2, "big")


def _chromaticity() -> bytes:
    """Bytes 19h-22h: 10-bit x/y, low 2 bits packed first (E-EDID 1.4 section 3.7)."""
    values = [round(c * 1024) for xy in SRGB_PRIMARIES for c in xy]
    low = [sum((values[i + k] & 3) << (6 - 2 * k) for k in range(4)) for i in (0, 4)]
    return bytes(low + [x >> 2 for x in values])


def _finish(block: bytearray) -> bytes:
    """Byte 127 makes the block's bytes sum to 0 mod 256 (E-EDID 1.4 section 3.11)."""
    block[BLOCK - 1] = (-sum(block[:BLOCK - 1])) % 256
    return bytes(block)


def _base(specs: Sequence[Spec], name: str, manufacturer: str, extensions: int,
          hdmi: bool) -> bytes:  # fmt: skip
    block = bytearray(BLOCK)
    block[0:8] = HEADER
    block[0x08:0x0A] = _manufacturer(manufacturer)
    block[0x11] = 2026 - 1990  # model year 2026 (section 3.4.4), fixed: output is deterministic
    block[0x12:0x14] = b"\x01\x04"  # EDID 1.4 (section 3.5)
    block[0x14] = 0x80 | 0x20 | (0x02 if hdmi else 0x01)  # digital, 8 bpc, HDMI-a / DVI (3.6.1)
    block[0x17] = 120  # gamma 2.2 stored as 100 x gamma - 100 (section 3.6.3)
    block[0x18] = 0x02  # RGB 4:4:4; preferred timing is native (section 3.6.4)
    block[0x19:0x23] = _chromaticity()
    block[0x26:0x36] = b"\x01" * 16  # no standard timings (section 3.9)
    slots = [dtd(s) for s in specs[:BASE_TIMING_SLOTS]]
    slots += [_text_descriptor(0xFC, name), _range_descriptor(specs)]
    while len(slots) < 4:
        slots.append(bytes([0, 0, 0, 0x10, 0]) + bytes(13))  # dummy descriptor (3.10.3.11)
    for i, raw in enumerate(slots):
        block[0x36 + i * DTD_LENGTH:0x36 + (i + 1) * DTD_LENGTH] = raw
    block[0x7E] = extensions
    return _finish(block)


def cta_vics(spec: Spec) -> list[int]:
    """The CTA-861 VICs in the library with exactly ``spec``'s timing."""
    out = []
    for m in modes.library():
        if m.interlaced != spec.interlaced:
            continue
        for source in (m.source, *m.also):
            if source.startswith("CTA VIC ") and (m.pixel_clock_hz, m.horizontal, m.vertical) \
                    == (spec.pixel_clock_hz, spec.horizontal, spec.vertical):  # fmt: skip
                vic = int(source.split()[2])
                if vic not in out:
                    out.append(vic)
    return out


def _cta(specs: Sequence[Spec], extra: Sequence[Spec]) -> bytes:
    """A CTA-861 extension, version 3 (CTA-861 section 7.5; from memory): a video data block
    (tag 2) of short video descriptors, the first flagged native when its VIC is 1..64,
    then the timings that did not fit the base block."""
    vics = [v for s in specs for v in cta_vics(s)]
    vics = list(dict.fromkeys(vics))[:31]
    codes = [v + 128 if i == 0 and v <= 64 else v for i, v in enumerate(vics)]
    data = bytes([0x40 | len(codes), *codes]) if codes else b""
    start = 4 + len(data)
    room = (BLOCK - 1 - start) // DTD_LENGTH
    if len(extra) > room:
        raise EdidWriteError(f"{len(specs)} timings do not fit: the base block holds "
                             f"{BASE_TIMING_SLOTS} and this CTA block {room} more")  # fmt: skip
    block = bytearray(BLOCK)
    block[0:4] = bytes([CTA_TAG, 3, start, len(specs[:1])])
    block[4:start] = data
    for i, s in enumerate(extra):
        block[start + i * DTD_LENGTH:start + (i + 1) * DTD_LENGTH] = dtd(s)
    return _finish(block)


def build(specs: Sequence[Spec], *, name: str = "", cta: bool = False,
          manufacturer: str = DEFAULT_MANUFACTURER) -> bytes:  # fmt: skip
    """An EDID 1.4 base block for ``specs`` (the first is preferred), plus a CTA block if ``cta``.

    ``name`` (default: the first spec's name) is cut to the 13 characters the monitor
    name descriptor holds.
    """
    if not specs:
        raise EdidWriteError("give at least one timing")
    extra = specs[BASE_TIMING_SLOTS:]
    if extra and not cta:
        raise EdidWriteError(f"{len(specs)} timings: the base block holds "
                             f"{BASE_TIMING_SLOTS} beside the name and range limits; "
                             "add a CTA-861 extension for more")  # fmt: skip
    base = _base(specs, name or specs[0].name, manufacturer, 1 if cta else 0, cta)
    return base + (_cta(specs, extra) if cta else b"")


def hex_dump(data: bytes) -> str:
    """Sixteen bytes a line, upper-case hex separated by spaces."""
    return "".join(data[i:i + 16].hex(" ").upper() + "\n" for i in range(0, len(data), 16))


def readmemh(data: bytes) -> str:
    """A Verilog ``$readmemh`` file: one byte a line, two hex digits (IEEE 1364 section 17.2.8)."""
    return "".join(f"{b:02X}\n" for b in data)
