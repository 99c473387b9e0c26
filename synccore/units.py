"""Deterministic text for frequencies and shares (never locale- or float-repr-dependent)."""

from __future__ import annotations

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
