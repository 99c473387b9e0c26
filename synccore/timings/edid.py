"""Reading a display's EDID: binary or a hex dump in, a typed description out.

:func:`read_bytes` takes the raw file (binary, or hex text with spaces, newlines, ``0x``
prefixes, offset columns or a C array) and gives the EDID bytes; :func:`decode` checks
the header and every block's checksum and decodes the base block (VESA E-EDID 1.4) and
its CTA-861 extensions.  Damage does not stop decoding: whatever can still be read is
returned, and each problem is one line in :attr:`Edid.problems`.  Only input with
nothing to read (empty, not an EDID at all) raises :class:`EdidError`.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any

from synccore.timings._edid_blocks import (
    DTD_LENGTH,
    CtaBlock,
    DetailedTiming,
    ListedTiming,
    RangeLimits,
    ShortVideo,
    descriptor_text,
    detailed_timing,
    established,
    range_limits,
    short_videos,
    standard,
)  # fmt: skip

__all__ = ["CtaBlock", "DetailedTiming", "Edid", "EdidError", "ListedTiming", "RangeLimits",
           "ShortVideo", "decode", "read", "read_bytes"]  # fmt: skip

BLOCK = 128
"""Every EDID block is 128 bytes (E-EDID 1.4 section 2.2; from memory)."""

HEADER = bytes([0x00, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0xFF, 0x00])
"""Bytes 00h..07h of the base block (E-EDID 1.4 section 3.3)."""

DESCRIPTOR_OFFSETS = (0x36, 0x48, 0x5A, 0x6C)
"""The four 18-byte data blocks of the base block (E-EDID 1.4 section 3.10)."""

CTA_TAG = 0x02
"""Extension tag of a CTA-861 block (CTA-861 section 7.5; from memory)."""


class EdidError(ValueError):
    """Input with nothing to decode: empty, not hex, or not an EDID; ``str()`` is one line."""


@dataclass(frozen=True)
class Edid:
    """What an EDID says; ``problems`` lists damage found (empty when the EDID is sound)."""

    manufacturer: str
    product_code: int
    serial_number: int
    version: str  # "1.4"
    digital: bool
    image_size_cm: tuple[int, int]
    monitor_name: str
    serial_text: str
    range_limits: RangeLimits | None
    detailed: tuple[DetailedTiming, ...]  # the base block's, in order: the first is preferred
    established: tuple[ListedTiming, ...]
    standard: tuple[ListedTiming, ...]
    cta: tuple[CtaBlock, ...]
    extension_count: int
    problems: tuple[str, ...]

    @property
    def all_detailed(self) -> tuple[DetailedTiming, ...]:
        """Base block descriptors first (preferred first), then each CTA block's."""
        return self.detailed + tuple(d for c in self.cta for d in c.detailed)

    def to_json(self) -> dict[str, Any]:
        """The same as one JSON-ready object; detailed timings use the spec format's keys."""
        return {
            "manufacturer": self.manufacturer, "product_code": self.product_code,
            "serial_number": self.serial_number, "version": self.version,
            "digital": self.digital, "image_size_cm": list(self.image_size_cm),
            "monitor_name": self.monitor_name, "serial_text": self.serial_text,
            "range_limits": _limits_json(self.range_limits),
            "detailed_timings": [_dtd_json(d) for d in self.detailed],
            "established_timings": [_listed_json(t) for t in self.established],
            "standard_timings": [_listed_json(t) for t in self.standard],
            "cta_extensions": [_cta_json(c) for c in self.cta],
            "extension_count": self.extension_count,
            "problems": list(self.problems),
        }  # fmt: skip


def _axis_json(d: DetailedTiming, vertical: bool) -> dict[str, Any]:
    a = d.vertical if vertical else d.horizontal
    return {"active": a.active, "front_porch": a.front_porch, "sync": a.sync,
            "back_porch": a.back_porch, "sync_polarity": a.sync_polarity}  # fmt: skip


def _dtd_json(d: DetailedTiming) -> dict[str, Any]:
    return {"where": d.where, "name": d.name, "pixel_clock_hz": d.pixel_clock_hz,
            "horizontal": _axis_json(d, False), "vertical": _axis_json(d, True),
            "sync_type": d.sync_type, "interlaced": d.interlaced, "stereo": d.stereo,
            "image_size_mm": list(d.image_size_mm), "border": list(d.border),
            "usable": not d.refusal, "refused_because": d.refusal}  # fmt: skip


def _listed_json(t: ListedTiming) -> dict[str, str]:
    return {"timing": t.label, "library": t.library}


def _limits_json(r: RangeLimits | None) -> dict[str, int] | None:
    if r is None:
        return None
    return {"min_refresh_hz": r.min_refresh_hz, "max_refresh_hz": r.max_refresh_hz,
            "min_line_rate_hz": r.min_line_rate_hz, "max_line_rate_hz": r.max_line_rate_hz,
            "max_pixel_clock_hz": r.max_pixel_clock_hz}  # fmt: skip


def _cta_json(c: CtaBlock) -> dict[str, Any]:
    return {"block": c.index, "revision": c.revision, "native_formats": c.native_formats,
            "short_video_descriptors": [{"vic": v.vic, "native": v.native, "library": v.library}
                                        for v in c.videos],
            "detailed_timings": [_dtd_json(d) for d in c.detailed]}  # fmt: skip


# ------------------------------------------------------------------ input text

_BYTE_TOKEN = re.compile(r"(?:0x)?((?:[0-9a-f]{2})+|[0-9a-f])", re.IGNORECASE)


def _is_text(raw: bytes) -> bool:
    return all(b in b"\t\n\r" or 0x20 <= b < 0x7F for b in raw)


def _strip_c(text: str) -> str:
    text = re.sub(r"/\*.*?\*/", " ", text, flags=re.DOTALL)
    text = re.sub(r"//[^\n]*", " ", text)
    if "{" in text and "}" in text:  # a C array: only what is between the braces
        text = text[text.index("{") + 1:text.rindex("}")]
    return text


def read_bytes(raw: bytes) -> bytes:
    """The EDID bytes of a file: binary as it is, hex text decoded; raises :class:`EdidError`."""
    if not raw or not raw.strip():
        raise EdidError("empty input: no EDID bytes")
    if not _is_text(raw):
        return raw
    out = bytearray()
    for n, line in enumerate(_strip_c(raw.decode("ascii")).splitlines(), start=1):
        for token in re.split(r"[\s,;]+", line):
            if not token or token.endswith(":"):  # an offset column such as "0010:"
                continue
            m = _BYTE_TOKEN.fullmatch(token)
            if m is None:
                raise EdidError(f"not an EDID: hex dump line {n} has {token[:20]!r}, not hex bytes")
            digits = m.group(1)
            out.extend(bytes.fromhex(digits if len(digits) > 1 else "0" + digits))
    if not out:
        raise EdidError("empty input: no EDID bytes")
    return bytes(out)


def read(raw: bytes) -> Edid:
    """:func:`decode` of :func:`read_bytes`."""
    return decode(read_bytes(raw))


# --------------------------------------------------------------------- blocks

def _manufacturer(raw: bytes) -> tuple[str, list[str]]:
    """Bytes 08h..09h: three 5-bit letters, 1 = A, bit 15 reserved (E-EDID 1.4 section 3.4.1)."""
    word = raw[0x08] << 8 | raw[0x09]
    codes = [(word >> s) & 0x1F for s in (10, 5, 0)]
    text = "".join(chr(ord("A") + c - 1) if 1 <= c <= 26 else "?" for c in codes)
    problems = ["manufacturer ID: reserved bit 15 of bytes 08h-09h is set"] if word & 0x8000 else []
    if "?" in text:
        problems.append(f"manufacturer ID: {word:04X}h is not three letters A-Z")
    return text, problems


def _checksum(block: bytes, name: str) -> list[str]:
    """The sum of a block's 128 bytes must be 0 mod 256 (E-EDID 1.4 section 3.11)."""
    total = sum(block) % 256
    if total:
        return [f"{name}: checksum wrong (bytes sum to {total:02X}h mod 256, must be 00h); "
                "its contents are shown but may be damaged"]  # fmt: skip
    return []


@dataclass
class _Texts:
    name: str = ""
    serial: str = ""
    limits: RangeLimits | None = None


def _descriptors(block: bytes, offsets: tuple[int, ...], where: str, texts: _Texts,
                 problems: list[str]) -> tuple[DetailedTiming, ...]:  # fmt: skip
    """The 18-byte blocks at ``offsets``: timings returned, display descriptors into ``texts``."""
    out = []
    for n, at in enumerate(offsets, start=1):
        raw = block[at:at + DTD_LENGTH]
        if len(raw) < DTD_LENGTH:
            problems.append(f"{where}, descriptor {n}: truncated")
            break
        if raw[0] or raw[1]:
            out.append(detailed_timing(raw, f"{where}, descriptor {n}"))
            continue
        _display_descriptor(raw, f"{where}, descriptor {n}", texts, problems)
    return tuple(out)


def _display_descriptor(raw: bytes, where: str, texts: _Texts, problems: list[str]) -> None:
    """A display descriptor: pixel clock 0, byte 3 the tag (E-EDID 1.4 section 3.10.3)."""
    tag = raw[3]
    if raw[2] or (raw[4] and tag != 0xFD):
        problems.append(f"{where}: reserved bytes 2 or 4 of a display descriptor are not 00h")
    if tag == 0xFC:  # display product name (section 3.10.3.4)
        texts.name = descriptor_text(raw)
    elif tag == 0xFF:  # display product serial number (section 3.10.3.1)
        texts.serial = descriptor_text(raw)
    elif tag == 0xFD:  # display range limits (section 3.10.3.3)
        texts.limits, found = range_limits(raw)
        problems.extend(f"{where}: {p}" for p in found)
    elif tag in (0x00, 0x10) and any(raw[5:]):  # 10h: dummy; 00h..0Fh: manufacturer
        if tag == 0x10:
            problems.append(f"{where}: dummy descriptor (tag 10h) carries data")


def _base(block: bytes, problems: list[str]) -> dict[str, Any]:
    texts = _Texts()
    maker, found = _manufacturer(block)
    problems.extend(found)
    detailed = _descriptors(block, DESCRIPTOR_OFFSETS, "base block", texts, problems)
    for d in detailed:
        if d.pixel_clock_hz == 0:  # pragma: no cover - a zero clock is a display descriptor
            problems.append(f"{d.where}: pixel clock is zero")
    if block[0x36] == 0 and block[0x37] == 0 and block[0x12:0x14] == b"\x01\x04":
        problems.append("base block, descriptor 1: EDID 1.4 requires the preferred timing here "
                        "(section 3.10.1), found a display descriptor")  # fmt: skip
    return dict(
        manufacturer=maker, product_code=block[0x0A] | block[0x0B] << 8,  # section 3.4.2
        serial_number=int.from_bytes(block[0x0C:0x10], "little"),  # section 3.4.3
        version=f"{block[0x12]}.{block[0x13]}",  # section 3.5
        digital=bool(block[0x14] & 0x80),  # section 3.6.1
        image_size_cm=(block[0x15], block[0x16]),  # section 3.6.2
        monitor_name=texts.name, serial_text=texts.serial, range_limits=texts.limits,
        detailed=detailed, established=established(block[0x23:0x26]),  # section 3.8
        standard=standard(block[0x26:0x36]),  # section 3.9
        extension_count=block[0x7E],  # section 3.11
    )  # fmt: skip


def _cta(block: bytes, index: int, problems: list[str]) -> CtaBlock:
    """A CTA-861 block: byte 2 is where its DTDs start, data blocks before (CTA-861 7.5)."""
    where = f"CTA block {index}"
    start = block[2]
    videos: tuple[ShortVideo, ...] = ()
    at = 4
    end = start if 4 <= start <= BLOCK - 1 else 4
    if start and not 4 <= start <= BLOCK - 1:
        problems.append(f"{where}: detailed timing offset {start} is outside 4..127")
    while at < end:
        tag, length = block[at] >> 5, block[at] & 0x1F
        body = block[at + 1:min(at + 1 + length, end)]
        if at + 1 + length > end:
            problems.append(f"{where}: data block at byte {at} runs past the detailed timings")
        if tag == 2:  # video data block (CTA-861 section 7.5.1)
            videos += short_videos(body)
            bad = [c for c in body if c in (0, 128, 254, 255)]
            if bad:
                problems.append(f"{where}: reserved short video descriptor codes {bad}")
        at += 1 + length
    texts = _Texts()
    offsets = tuple(range(end, BLOCK - DTD_LENGTH, DTD_LENGTH)) if start >= 4 else ()
    detailed = _descriptors(block, offsets, where, texts, problems)
    return CtaBlock(index=index, revision=block[1], native_formats=block[3] & 0x0F,
                    videos=videos, detailed=detailed)  # fmt: skip


def _extensions(data: bytes, count: int, problems: list[str]) -> tuple[CtaBlock, ...]:
    out = []
    blocks = max(count, (len(data) - 1) // BLOCK)
    for i in range(1, blocks + 1):
        block = data[i * BLOCK:(i + 1) * BLOCK]
        if len(block) < BLOCK:
            problems.append(f"extension block {i}: truncated ({len(block)} of {BLOCK} bytes); "
                            "not decoded")  # fmt: skip
            continue
        problems.extend(_checksum(block, f"extension block {i}"))
        if block[0] == CTA_TAG:
            out.append(_cta(block, i, problems))
        else:
            problems.append(f"extension block {i}: unknown extension tag {block[0]:02X}h; "
                            "not decoded")  # fmt: skip
    if len(data) > BLOCK * (1 + count):
        problems.append(f"the base block announces {count} extension(s), "
                        f"the data has {(len(data) - 1) // BLOCK}")  # fmt: skip
    return tuple(out)


def decode(data: bytes) -> Edid:
    """Decode EDID bytes; damage is listed in ``problems``; raises :class:`EdidError` if none."""
    if not data:
        raise EdidError("empty input: no EDID bytes")
    head = data[:8]
    matching = sum(a == b for a, b in zip(head, HEADER, strict=False))
    if len(head) == 8 and matching < 6 or len(head) < 8 and head != HEADER[:len(head)]:
        raise EdidError("not an EDID: it does not start with the header "
                        "00 FF FF FF FF FF FF 00 (E-EDID 1.4 section 3.3)")  # fmt: skip
    problems: list[str] = []
    if len(head) == len(HEADER) and head != HEADER:
        problems.append(f"header: {head.hex(' ').upper()} is not 00 FF FF FF FF FF FF 00 "
                        "(section 3.3)")  # fmt: skip
    base = data[:BLOCK]
    if len(base) < BLOCK:
        problems.append(f"truncated: {len(data)} of {BLOCK} bytes of the base block; "
                        "missing bytes read as 00h")  # fmt: skip
        base = base + bytes(BLOCK - len(base))
    else:
        problems.extend(_checksum(base, "base block"))
    fields = _base(base, problems)
    cta = _extensions(data, fields["extension_count"], problems) if len(data) > BLOCK or \
        fields["extension_count"] else ()  # fmt: skip
    return Edid(**fields, cta=cta, problems=tuple(problems))
