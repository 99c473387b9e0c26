"""The built-in library of standard display timings (VESA DMT and CTA-861).

The table lives in ``synccore/timings/data/modes.yaml`` as data, not code.  Each
entry carries the spec format's own keys (``pixel_clock_hz``, ``horizontal``,
``vertical``) plus where it comes from (a DMT ID or a CTA VIC).  A DMT ID is
written as the DMT document writes it, two hex digits and ``h``: ``DMT 04h``,
``DMT 1Ah``.  CTA formats at
24, 30 and 60 Hz also exist at 1000/1001 of their clock; those variants are
derived here when the table is loaded, so the file lists each format once.

Lookup grammar (``standard:`` in a spec, ``synccore new NAME``):

* a source: ``"DMT 55h"`` or ``"DMT 0x55"`` (any case), ``"CTA VIC 4"`` (``"VIC 4"`` too);
* a name: ``"1280x720@60"``, ``"1920x1080@59.94"``, optionally followed by words
  that narrow it down: ``dmt``, ``cta`` or ``rb`` (reduced blanking), e.g.
  ``"1280x768@60 rb"``.

A name that matches entries with different timings is ambiguous and refused,
naming the candidates; entries with identical timings (DMT 55h and CTA VIC 4)
count as one.  :func:`search` (the ``synccore modes`` filter) takes a DMT ID in
either form too.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from decimal import Decimal
from fractions import Fraction
from functools import lru_cache
from importlib import resources
from typing import Any

import yaml

from synccore.spec import Axis

TMDS_BITS_PER_PIXEL = 10
"""TMDS sends 10 bits per 8-bit colour component per pixel clock (common practice)."""

_FRACTIONAL_LABEL = {"24": "23.976", "30": "29.97", "60": "59.94"}


@dataclass(frozen=True)
class Mode:
    """One standard timing."""

    source: str  # "DMT 55h" or "CTA VIC 4", with " (1000/1001)" for derived variants
    refresh_label: str  # nominal refresh as the standard names it: "60", "59.94"
    pixel_clock_hz: Fraction
    horizontal: Axis
    vertical: Axis
    also: tuple[str, ...] = ()
    note: str = ""
    aspect: str = ""
    interlaced: bool = False  # two fields per frame; ``vertical`` describes one field
    repetition: int = 1  # CTA-861 pixel repetition: each picture pixel is sent this many times

    @property
    def width(self) -> int:
        """Picture pixels per line (the active pixel clocks over the repetition)."""
        return self.horizontal.active // self.repetition

    @property
    def height(self) -> int:
        """Picture rows per frame (both fields' rows when interlaced)."""
        return self.vertical.active * (2 if self.interlaced else 1)

    @property
    def name(self) -> str:
        """WIDTHxHEIGHT@RATE, with an i before the @ for interlaced modes (the field rate)."""
        return f"{self.width}x{self.height}{'i' if self.interlaced else ''}@{self.refresh_label}"

    @property
    def family(self) -> str:
        return self.source.split()[0]

    @property
    def nominal_refresh_hz(self) -> Fraction:
        return Fraction(Decimal(self.refresh_label))

    @property
    def line_rate_hz(self) -> Fraction:
        return self.pixel_clock_hz / self.horizontal.total

    @property
    def refresh_hz(self) -> Fraction:
        """Frames per second, or fields per second when interlaced."""
        if self.interlaced:
            return self.line_rate_hz * 2 / (2 * self.vertical.total + 1)
        return self.line_rate_hz / self.vertical.total

    @property
    def tmds_bit_rate(self) -> Fraction:
        """Bits per second on each TMDS data pair for 8-bit colour."""
        return self.pixel_clock_hz * TMDS_BITS_PER_PIXEL

    @property
    def reduced_blanking(self) -> bool:
        return "reduced blanking" in self.note

    def same_timing(self, other: Mode) -> bool:
        return (self.pixel_clock_hz, self.horizontal, self.vertical, self.interlaced) == (
            other.pixel_clock_hz, other.horizontal, other.vertical, other.interlaced)  # fmt: skip

    def as_spec_keys(self) -> dict[str, Any]:
        """The spec format's keys for this timing, plus its source (for ``--json``)."""
        return {
            "name": self.name,
            "source": self.source,
            **({"also": list(self.also)} if self.also else {}),
            **({"note": self.note} if self.note else {}),
            "refresh": self.refresh_label,
            # The spec format takes whole Hz; 1000/1001 clocks also give their exact ratio.
            "pixel_clock_hz": round(self.pixel_clock_hz),
            **({"pixel_clock_exact_hz": _number(self.pixel_clock_hz)}
               if self.pixel_clock_hz.denominator != 1 else {}),
            "horizontal": _axis_dict(self.horizontal),
            "vertical": _axis_dict(self.vertical),
            **({"interlaced": True} if self.interlaced else {}),
            **({"pixel_repetition": self.repetition} if self.repetition > 1 else {}),
        }


def _number(value: Fraction) -> int | str:
    """An exact JSON-friendly number: an int when whole, else an exact decimal or a ratio."""
    if value.denominator == 1:
        return int(value)
    return f"{value.numerator}/{value.denominator}"


def _axis_dict(a: Axis) -> dict[str, Any]:
    return {"active": a.active, "front_porch": a.front_porch, "sync": a.sync,
            "back_porch": a.back_porch, "sync_polarity": a.sync_polarity}  # fmt: skip


def _axis(raw: dict[str, Any]) -> Axis:
    return Axis(**{k: raw[k] for k in ("active", "front_porch", "sync", "back_porch",
                                       "sync_polarity")})  # fmt: skip


@lru_cache(maxsize=1)
def library() -> tuple[Mode, ...]:
    """Every mode of the built-in table, derived 1000/1001 variants included, in table order."""
    text = resources.files("synccore.timings").joinpath("data/modes.yaml").read_text(encoding="utf-8")
    raw = yaml.safe_load(text)
    out: list[Mode] = []
    for e in raw["modes"]:
        label = str(e["refresh"])
        base = Mode(
            source=e["source"],
            refresh_label=label,
            pixel_clock_hz=Fraction(e["pixel_clock_hz"]),
            horizontal=_axis(e["horizontal"]),
            vertical=_axis(e["vertical"]),
            also=tuple(e.get("also", ())),
            note=e.get("note", ""),
            aspect=str(e.get("aspect", "")),
            interlaced=bool(e.get("interlaced", False)),
            repetition=int(e.get("pixel_repetition", 1)),
        )
        out.append(base)
        if e.get("fractional"):
            out.append(Mode(
                source=f"{base.source} (1000/1001)",
                refresh_label=_FRACTIONAL_LABEL[label],
                pixel_clock_hz=base.pixel_clock_hz * 1000 / 1001,
                horizontal=base.horizontal,
                vertical=base.vertical,
                also=tuple(f"{a} (1000/1001)" for a in base.also),
                note=base.note,
                aspect=base.aspect,
                interlaced=base.interlaced,
                repetition=base.repetition,
            ))  # fmt: skip
    return tuple(out)


class ModeLookupError(ValueError):
    """A name that matches no entry, or several entries with different timings."""


_SOURCE = re.compile(r"\s*(?:(dmt)\s*(?:id\s*)?(0x[0-9a-f]+|[0-9a-f]+h?)|(?:cta\s*)?vic\s*([0-9]+))"
                     r"(\s*\(1000/1001\)|\s*@\s*(?:59\.94|29\.97|23\.976))?\s*\Z",
                     re.IGNORECASE)  # fmt: skip
_NAME = re.compile(r"\s*([0-9]+)\s*x\s*([0-9]+)(i?)\s*@\s*([0-9]+(?:\.[0-9]+)?)\s*(?:hz)?"
                   r"((?:\s+\w+)*)\s*\Z", re.IGNORECASE)  # fmt: skip
_DMT_ID_WORD = re.compile(r"0x([0-9a-f]{1,2})|([0-9][0-9a-f]?)h", re.IGNORECASE)
QUALIFIERS = ("dmt", "cta", "rb", "std")


def dmt_source(number: int) -> str:
    """A DMT ID as the DMT document writes it: ``DMT 04h``, ``DMT 1Ah`` (from memory)."""
    return f"DMT {number:02X}h"


def _canonical_source(text: str) -> str | None:
    m = _SOURCE.match(text)
    if not m:
        return None
    suffix = " (1000/1001)" if m.group(4) else ""
    if m.group(1):
        digits = m.group(2).lower().removeprefix("0x").removesuffix("h")
        return f"{dmt_source(int(digits, 16))}{suffix}"
    return f"CTA VIC {int(m.group(3))}{suffix}"


def find(query: str) -> Mode:
    """The one mode a query names; raises :class:`ModeLookupError` with the reason otherwise."""
    source = _canonical_source(query)
    if source is not None:
        for mode in library():
            if mode.source == source or source in mode.also:
                return mode
        raise ModeLookupError(f"no library entry has the source {source!r}")
    m = _NAME.match(query)
    if not m:
        raise ModeLookupError(
            "must name a mode like '1280x720@60' (optionally followed by dmt, cta, rb or std) "
            "or a source like 'DMT 55h' or 'CTA VIC 4'"
        )
    width, height, rate = int(m.group(1)), int(m.group(2)), m.group(4)
    interlaced = bool(m.group(3))
    words = [w.lower() for w in m.group(5).split()]
    for w in words:
        if w not in QUALIFIERS:
            raise ModeLookupError(
                f"unknown word {w!r} after the mode name; use dmt, cta, rb or std")
    try:
        wanted = Fraction(Decimal(rate))
    except ArithmeticError:  # pragma: no cover - the pattern admits only numbers
        raise ModeLookupError(f"bad refresh {rate!r}") from None
    found = [
        mode for mode in library()
        if (mode.width, mode.height, mode.interlaced) == (width, height, interlaced)
        and mode.nominal_refresh_hz == wanted
        and ("dmt" not in words or mode.family == "DMT")
        and ("cta" not in words or mode.family == "CTA")
        and ("rb" not in words or mode.reduced_blanking)
        and ("std" not in words or not mode.reduced_blanking)
    ]  # fmt: skip
    if not found:
        near = sorted({m.name for m in library()
                       if (m.width, m.height) == (width, height)},
                      key=lambda n: Decimal(n.split("@")[1]))  # fmt: skip
        hint = f"; this size exists as {', '.join(near)}" if near else ""
        raise ModeLookupError(f"no library entry is {width}x{height}{m.group(3)}@{rate}"
                           f"{' ' + ' '.join(words) if words else ''}{hint}")  # fmt: skip
    distinct: list[Mode] = []
    for mode in found:
        if not any(mode.same_timing(d) for d in distinct):
            distinct.append(mode)
    if len(distinct) > 1:
        names = ", ".join(f"{d.source}{' (' + d.note + ')' if d.note else ''}" for d in distinct)
        example = distinct[0].source
        raise ModeLookupError(f"is ambiguous: it matches {names}; name the source instead "
                              f"(e.g. {example!r}) or add dmt, cta, rb or std")
    return found[0]


def _search_word(word: str) -> str:
    """A filter word, lower case; a DMT ID (``0x4``, ``04h``) in the library's own form."""
    m = _DMT_ID_WORD.fullmatch(word)
    return f"{int(m.group(1) or m.group(2), 16):02x}h" if m else word.lower()


def search(text: str = "", *, max_clock_hz: Fraction | None = None) -> list[Mode]:
    """Modes whose name, source or note contain every word of ``text`` (case-insensitive).

    A word that is a DMT ID, ``0x04`` or ``04h``, matches that ID's entry.
    """
    words = [_search_word(w) for w in text.split()]
    out = []
    for mode in library():
        hay = " ".join((mode.name, mode.source, " ".join(mode.also), mode.note)).lower()
        if all(w in hay for w in words) and (
            max_clock_hz is None or mode.pixel_clock_hz <= max_clock_hz
        ):
            out.append(mode)
    return out
