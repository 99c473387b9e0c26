"""Deterministic text for frequencies and shares (never locale- or float-repr-dependent)."""

from __future__ import annotations

import math
import re
from fractions import Fraction

_STEPS = ((10**9, "GHz"), (10**6, "MHz"), (10**3, "kHz"), (1, "Hz"))


def fixed(value: Fraction | float | int, digits: int) -> str:
    """``value`` rounded half-up to ``digits`` decimals, exactly, as text."""
    v = Fraction(value)
    scale = 10**digits
    sign = "-" if v < 0 else ""
    n = (abs(v) * scale * 2 + 1) // 2  # round half up on the magnitude
    whole, frac = divmod(int(n), scale)
    return f"{sign}{whole}.{frac:0{digits}d}" if digits else f"{sign}{whole}"


def hz(value: Fraction | int, digits: int = 3) -> str:
    """A frequency with the largest unit that keeps it at or above 1, e.g. ``25.175 MHz``."""
    v = Fraction(value)
    for step, unit in _STEPS:
        if abs(v) >= step:
            return f"{fixed(v / step, digits)} {unit}"
    return f"{fixed(v, digits)} Hz"


def in_unit(value: Fraction | int, unit: str, digits: int = 3) -> str:
    """A frequency in a fixed unit (Hz, kHz, MHz, GHz), without the unit."""
    step = dict((u, s) for s, u in _STEPS)[unit]
    return fixed(Fraction(value) / step, digits)


def percent(value: Fraction, digits: int = 1) -> str:
    return f"{fixed(value * 100, digits)} %"


_PREFIX: dict[str, Fraction | int] = {
    "": 1, "m": Fraction(1, 10**3), "u": Fraction(1, 10**6), "µ": Fraction(1, 10**6), "k": 10**3, "M": 10**6,
}  # fmt: skip
_QUANTITY = re.compile(
    r"\s*([0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE]([+-]?[0-9]{1,3}))?\s*([mukMµ]?)\s*(\S*)\s*\Z"
)
UNIT_SPELLINGS = {"V": ("v",), "A": ("a",), "ohm": ("ohm", "ohms", "Ω", "r")}
MAX_EXPONENT = 30
"""Numbers with units are read exactly; an exponent beyond ±30 is refused, not expanded."""


_NUMBER = re.compile(r"\s*[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE]([+-]?[0-9]+))?\s*\Z")


def exact_number(text: str) -> Fraction | None:
    """A decimal number's text (``25.175``, ``2.5e7``) as an exact fraction; None if it is not one,
    is not finite, has more than 100 characters, or an exponent beyond ±30 (which would make the
    exact value enormous to compute)."""
    match = _NUMBER.match(text) if len(text) <= 100 else None
    if match is None or (match.group(1) is not None and abs(int(match.group(1))) > MAX_EXPONENT):
        return None
    return Fraction(text.strip())


def parse_quantity(value: object, unit: str) -> Fraction | None:
    """``3.3V``, ``3300 mV``, ``8mA``, ``2.2k`` (ohms) as an exact number in ``unit``; None if not one.

    A bare number is taken in ``unit``; a prefix (m, u, k, M) scales it; the unit, when
    written, must be ``unit`` (V, A, or ohm/Ω/R).  Exponents are bounded (:data:`MAX_EXPONENT`).
    """
    if isinstance(value, bool):
        return None
    if isinstance(value, int):
        return Fraction(value)
    if isinstance(value, float):
        return Fraction(repr(value)) if math.isfinite(value) and abs(value) < 10**MAX_EXPONENT else None
    if not isinstance(value, str):
        return None
    match = _QUANTITY.match(value)
    if not match:
        return None
    number, exponent, prefix, written = match.groups()
    if written and written.lower() not in UNIT_SPELLINGS[unit] and written != "Ω":
        return None
    if exponent is not None and abs(int(exponent)) > MAX_EXPONENT:
        return None
    out = Fraction(number) * Fraction(10) ** int(exponent or 0)
    return out * _PREFIX[prefix]
