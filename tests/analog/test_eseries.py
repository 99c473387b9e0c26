"""The E series against IEC 60063's tables."""

from __future__ import annotations

from fractions import Fraction

from synccore.analog import eseries

# IEC 60063:2015, the E24 series (from memory; the same list is printed on every resistor
# maker's value chart).  It is not the rounded geometric series: 2.7, 3.0 ... 4.7 and 8.2 differ.
IEC_E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
           3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)  # fmt: skip

# IEC 60063:2015, the E96 series, written out (from memory; E48 is every second value).
IEC_E96 = """1.00 1.02 1.05 1.07 1.10 1.13 1.15 1.18 1.21 1.24 1.27 1.30 1.33 1.37 1.40 1.43 1.47 1.50
1.54 1.58 1.62 1.65 1.69 1.74 1.78 1.82 1.87 1.91 1.96 2.00 2.05 2.10 2.15 2.21 2.26 2.32 2.37 2.43
2.49 2.55 2.61 2.67 2.74 2.80 2.87 2.94 3.01 3.09 3.16 3.24 3.32 3.40 3.48 3.57 3.65 3.74 3.83 3.92
4.02 4.12 4.22 4.32 4.42 4.53 4.64 4.75 4.87 4.99 5.11 5.23 5.36 5.49 5.62 5.76 5.90 6.04 6.19 6.34
6.49 6.65 6.81 6.98 7.15 7.32 7.50 7.68 7.87 8.06 8.25 8.45 8.66 8.87 9.09 9.31 9.53 9.76""".split()


def test_e24_is_the_standard_list() -> None:
    assert [f / 10 for f in eseries.E24] == list(IEC_E24)


def test_e96_and_e48_are_the_standard_lists() -> None:
    assert [f"{f / 100:.2f}" for f in eseries.E96] == IEC_E96
    assert [f"{f / 100:.2f}" for f in eseries.E48] == IEC_E96[::2]


def test_values_cover_the_decades_exactly() -> None:
    e24 = eseries.values("E24")
    assert e24[0] == 1 and e24[-1] == 10_000_000
    assert Fraction(47, 10) in e24 and Fraction(470) in e24 and Fraction(4700) in e24
    assert len(eseries.values("E96")) == 96 * 7 + 1


def test_around_picks_log_neighbours() -> None:
    assert eseries.around(278.6, "E24", 2) == [270, 300]
    assert eseries.around(975.0, "E24", 3) == [910, 1000, 1100]
    assert eseries.ohms(Fraction(2200)) == "2.2k" and eseries.ohms(Fraction(75)) == "75"
