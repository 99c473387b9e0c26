"""Preferred resistor values: the E24, E48 and E96 series of IEC 60063.

Each series lists the significant figures of one decade; a resistor's value is
one of them times a power of ten.  E24 is written out as the standard lists it
(its values are not the rounded geometric series: 2.7, 3.0, 3.3, ... keep older
choices); E48 and E96 are 10^(i/n) rounded to three figures, which is how the
standard's tables for those series read (checked against the tables in the tests).
"""

from __future__ import annotations

import bisect
import math
from fractions import Fraction

E24 = (10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
       33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91)  # fmt: skip
E96 = tuple(round(100 * 10 ** (i / 96)) for i in range(96))
E48 = E96[::2]

SERIES: dict[str, tuple[int, ...]] = {"E24": E24, "E48": E48, "E96": E96}
"""Significant figures per decade, by series name."""

LOWEST_OHM = 1
HIGHEST_OHM = 10_000_000
"""The range of values the designer picks from (1 Ω to 10 MΩ)."""


def values(series: str) -> list[Fraction]:
    """Every value of ``series`` from 1 Ω to 10 MΩ, ascending, exactly."""
    figures = SERIES[series]
    scale = Fraction(1, 10) if figures[0] == 10 else Fraction(1, 100)
    out: list[Fraction] = []
    for decade in range(0, 8):
        out += [f * scale * 10**decade for f in figures]
    return [v for v in out if LOWEST_OHM <= v <= HIGHEST_OHM]


def around(ideal: float, series: str, count: int) -> list[Fraction]:
    """The ``count`` values of ``series`` nearest to ``ideal`` on a log scale (ascending)."""
    table = _table(series)
    if ideal <= 0:
        return table[:count]
    i = bisect.bisect_left([float(v) for v in table], ideal)
    lo, hi = max(0, i - count), min(len(table), i + count)
    near = sorted(table[lo:hi], key=lambda v: (abs(math.log(float(v) / ideal)), v))[:count]
    return sorted(near)


def ohms(value: Fraction) -> str:
    """A resistance as it is printed on a parts list: ``75``, ``1k``, ``2.2k``, ``1.5M``."""
    for step, suffix in ((10**6, "M"), (10**3, "k"), (1, "")):
        if value >= step:
            text = f"{float(value / step):.3g}"
            return f"{text}{suffix}"
    return f"{float(value):.3g}"


_TABLES: dict[str, list[Fraction]] = {}


def _table(series: str) -> list[Fraction]:
    if series not in _TABLES:
        _TABLES[series] = values(series)
    return _TABLES[series]
