"""The byte layouts of EDID: the typed pieces and the decoding of each 18-byte block and list.

Written from the VESA E-EDID Standard, Release A Rev. 2 (EDID structure 1.4; section
numbers from memory) and CTA-861 (the CTA extension, version 3; from memory).  Every
decoder here takes bytes that are known to be present and returns a typed value plus
the problems it found, as strings; :mod:`.edid` assembles them.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from synccore.spec import Axis
from synccore.timings import modes

DTD_LENGTH = 18
"""Every 18-byte data block (E-EDID 1.4 section 3.10)."""

PIXEL_CLOCK_UNIT_HZ = 10_000
"""A detailed timing's pixel clock counts 10 kHz steps (E-EDID 1.4 section 3.10.2)."""


@dataclass(frozen=True)
class DetailedTiming:
    """One detailed timing descriptor (E-EDID 1.4 section 3.10.2, Table 3.21)."""

    where: str  # "base block, descriptor 1" or "CTA block 1, descriptor 2"
    pixel_clock_hz: int
    horizontal: Axis
    vertical: Axis
    image_size_mm: tuple[int, int]
    border: tuple[int, int]
    interlaced: bool
    stereo: str  # "" when the descriptor is not stereo
    sync_type: str  # "digital separate", "digital composite", "analog composite", ...
    flags: int  # byte 17 as read

    @property
    def refusal(self) -> str:
        """Why this descriptor cannot become a spec ("" when it can)."""
        if self.interlaced:
            return ("interlaced: an interlaced detailed timing is not read yet; the CTA-861 interlaced "
                    "formats are in the library (synccore modes i@)")
        if self.stereo:
            return f"stereo ({self.stereo}): synccore generates one picture per frame"
        if self.sync_type != "digital separate":
            return f"{self.sync_type} sync: a spec describes separate hsync and vsync"
        if self.horizontal.back_porch < 0 or self.vertical.back_porch < 0:
            return "front porch and sync are longer than the blanking"
        return ""

    @property
    def name(self) -> str:
        total = self.horizontal.total * self.vertical.total
        refresh = Fraction(self.pixel_clock_hz, total) if total > 0 else Fraction(0)
        return f"{self.horizontal.active}x{self.vertical.active}@{float(refresh):.2f}"


@dataclass(frozen=True)
class RangeLimits:
    """The display range limits descriptor, tag FDh (E-EDID 1.4 section 3.10.3.3)."""

    min_refresh_hz: int
    max_refresh_hz: int
    min_line_rate_hz: int
    max_line_rate_hz: int
    max_pixel_clock_hz: int  # 0 when not given


@dataclass(frozen=True)
class ListedTiming:
    """An established or standard timing, with the library entry it names (or "")."""

    label: str  # "640x480@60"
    library: str  # "DMT 04h" or "" when the library has no such entry


@dataclass(frozen=True)
class ShortVideo:
    """A short video descriptor of a CTA video data block (CTA-861 section 7.5.1)."""

    vic: int
    native: bool
    library: str  # the library's name of that VIC, "" when absent


@dataclass(frozen=True)
class CtaBlock:
    """A CTA-861 extension block (tag 02h)."""

    index: int
    revision: int
    native_formats: int
    videos: tuple[ShortVideo, ...]
    detailed: tuple[DetailedTiming, ...]


def _polarity(bit: int) -> str:
    return "positive" if bit else "negative"


_STEREO = {0b010: "field sequential, right on sync", 0b100: "field sequential, left on sync",
           0b011: "2-way interleaved, right on even lines",
           0b101: "2-way interleaved, left on even lines", 0b110: "4-way interleaved",
           0b111: "side by side interleaved"}  # fmt: skip
"""Byte 17 bits 6, 5 and 0 (E-EDID 1.4 section 3.10.2, Table 3.22; from memory)."""


def _sync(flags: int) -> tuple[str, str, str]:
    """Sync type and the two polarities from byte 17 bits 4..1 (E-EDID 1.4 Table 3.22)."""
    kind = (flags >> 3) & 0b11
    if kind == 0b11:  # digital separate: bit 2 vsync, bit 1 hsync polarity
        return "digital separate", _polarity(flags & 0x02), _polarity(flags & 0x04)
    if kind == 0b10:  # digital composite: bit 1 is the composite polarity
        pol = _polarity(flags & 0x02)
        return "digital composite", pol, pol
    return ("bipolar analog composite" if kind == 0b01 else "analog composite",
            "negative", "negative")  # fmt: skip


def detailed_timing(raw: bytes, where: str) -> DetailedTiming:
    """Decode an 18-byte detailed timing descriptor whose pixel clock is not zero."""
    clock = (raw[0] | raw[1] << 8) * PIXEL_CLOCK_UNIT_HZ
    h_active = raw[2] | (raw[4] >> 4) << 8
    h_blank = raw[3] | (raw[4] & 0x0F) << 8
    v_active = raw[5] | (raw[7] >> 4) << 8
    v_blank = raw[6] | (raw[7] & 0x0F) << 8
    h_front = raw[8] | (raw[11] >> 6) << 8
    h_sync = raw[9] | ((raw[11] >> 4) & 0x3) << 8
    v_front = raw[10] >> 4 | ((raw[11] >> 2) & 0x3) << 4
    v_sync = raw[10] & 0x0F | (raw[11] & 0x3) << 4
    flags = raw[17]
    kind, h_pol, v_pol = _sync(flags)
    stereo_code = (flags >> 4) & 0b110 | flags & 0b1
    return DetailedTiming(
        where=where, pixel_clock_hz=clock,
        horizontal=Axis(h_active, h_front, h_sync, h_blank - h_front - h_sync, h_pol),
        vertical=Axis(v_active, v_front, v_sync, v_blank - v_front - v_sync, v_pol),
        image_size_mm=(raw[12] | (raw[14] >> 4) << 8, raw[13] | (raw[14] & 0x0F) << 8),
        border=(raw[15], raw[16]), interlaced=bool(flags & 0x80),
        stereo=_STEREO.get(stereo_code, ""), sync_type=kind, flags=flags,
    )  # fmt: skip


def descriptor_text(raw: bytes) -> str:
    """The text of a display descriptor's bytes 5..17: up to 0Ah, trailing spaces dropped."""
    body = raw[5:DTD_LENGTH].split(b"\x0a", 1)[0]
    return "".join(chr(b) if 0x20 <= b < 0x7F else "?" for b in body).rstrip()


def range_limits(raw: bytes) -> tuple[RangeLimits, list[str]]:
    """The range limits descriptor (tag FDh, E-EDID 1.4 section 3.10.3.3, Table 3.26).

    Byte 4 bits 3..0 add 255 to a maximum (bits 1, 3) or to both limits (bits 0+1, 2+3).
    """
    offsets = raw[4]
    problems = [f"range limits: reserved bits of byte 4 are set ({offsets:02X}h)"] \
        if offsets & 0xF0 else []  # fmt: skip
    v_max_add = 255 if offsets & 0x02 else 0
    v_min_add = 255 if offsets & 0x03 == 0x03 else 0
    h_max_add = 255 if offsets & 0x08 else 0
    h_min_add = 255 if offsets & 0x0C == 0x0C else 0
    limits = RangeLimits(
        min_refresh_hz=raw[5] + v_min_add, max_refresh_hz=raw[6] + v_max_add,
        min_line_rate_hz=(raw[7] + h_min_add) * 1000, max_line_rate_hz=(raw[8] + h_max_add) * 1000,
        max_pixel_clock_hz=raw[9] * 10_000_000,
    )  # fmt: skip
    return limits, problems


def _library_name(width: int, height: int, refresh: int) -> str:
    """The library source of a WIDTHxHEIGHT@REFRESH mode, DMT first; "" when absent."""
    found = [m for m in modes.library()
             if (m.horizontal.active, m.vertical.active) == (width, height)
             and m.nominal_refresh_hz == refresh and not m.interlaced]  # fmt: skip
    found.sort(key=lambda m: (m.family != "DMT", m.reduced_blanking))
    return found[0].source if found else ""


ESTABLISHED = (
    (720, 400, 70), (720, 400, 88), (640, 480, 60), (640, 480, 67),
    (640, 480, 72), (640, 480, 75), (800, 600, 56), (800, 600, 60),
    (800, 600, 72), (800, 600, 75), (832, 624, 75), (1024, 768, 87),
    (1024, 768, 60), (1024, 768, 70), (1024, 768, 75), (1280, 1024, 75),
    (1152, 870, 75),
)
"""Established timings I and II, bytes 23h..25h bit 7 first (E-EDID 1.4 section 3.8, Table
3.18; from memory).  1024x768@87 is interlaced."""


def established(raw: bytes) -> tuple[ListedTiming, ...]:
    """The established timings whose bit is set in bytes 23h..25h (E-EDID 1.4 section 3.8)."""
    bits = raw[0] << 16 | raw[1] << 8 | raw[2]
    out = []
    for i, (w, h, r) in enumerate(ESTABLISHED):
        if bits & (1 << (23 - i)):
            interlaced = (w, h, r) == (1024, 768, 87)
            label = f"{w}x{h}@{r}{'i' if interlaced else ''}"
            out.append(ListedTiming(label, "" if interlaced else _library_name(w, h, r)))
    return tuple(out)


ASPECTS = ((16, 10), (4, 3), (5, 4), (16, 9))
"""Standard timing byte 2 bits 7..6 in EDID 1.3 and later (E-EDID 1.4 section 3.9, Table 3.19)."""


def standard(raw: bytes) -> tuple[ListedTiming, ...]:
    """The standard timings in bytes 26h..35h; 01h 01h marks an unused slot (section 3.9)."""
    out = []
    for i in range(0, 16, 2):
        first, second = raw[i], raw[i + 1]
        if (first, second) == (1, 1) or first == 0:
            continue
        width = (first + 31) * 8
        num, den = ASPECTS[second >> 6]
        height = width * den // num
        refresh = (second & 0x3F) + 60
        out.append(ListedTiming(f"{width}x{height}@{refresh}",
                                _library_name(width, height, refresh)))  # fmt: skip
    return tuple(out)


def vic_name(vic: int) -> str:
    for m in modes.library():
        if m.source == f"CTA VIC {vic}":
            return f"{m.source} {m.name}"
    return ""


def short_videos(data: bytes) -> tuple[ShortVideo, ...]:
    """Short video descriptors: one byte each (CTA-861-G section 7.5.1; from memory).

    Codes 129..192 are VIC 1..64 flagged native; 1..127 and 193..253 are the VIC itself.
    """
    out = []
    for code in data:
        if 129 <= code <= 192:
            vic, native = code - 128, True
        else:
            vic, native = code, False
        out.append(ShortVideo(vic, native, vic_name(vic)))
    return tuple(out)
