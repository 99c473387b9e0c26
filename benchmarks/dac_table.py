"""The DAC designer on the usual boards: bank voltage x colour depth x topology x series.

Prints a Markdown table (docs/dac.md keeps a copy) with the chosen values, full scale,
worst |DNL|/|INL|, the largest pin current, the bank current for all three channels and the
time the design took.

    python benchmarks/dac_table.py

A benchmark, not a test: the figures go in the docs.
"""

from __future__ import annotations

import time
from fractions import Fraction

from synccore.analog import DacOptions, design, network_text

CASES = [  # (bank V, bits per channel, topology, series)
    ("3.3", (3, 3, 2), "weighted", "E24"),
    ("3.3", (4, 4, 4), "weighted", "E24"),
    ("3.3", (4, 4, 4), "weighted", "E96"),
    ("3.3", (5, 6, 5), "weighted", "E96"),
    ("3.3", (8, 8, 8), "weighted", "E96"),
    ("3.3", (4, 4, 4), "r2r", "E24"),
    ("3.3", (8, 8, 8), "r2r", "E96"),
    ("2.5", (4, 4, 4), "weighted", "E24"),
    ("1.8", (4, 4, 4), "r2r", "E24"),
]


def main() -> None:
    print("| bank | bits | topology | series | values (widest channel) | full scale "
          "| max abs DNL / INL (LSB) | max pin current | bank current | time |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    for volts, bits, topology, series in CASES:
        opts = DacOptions(io_v=Fraction(volts), topology=topology, series=series)
        start = time.perf_counter()
        d = design(dict(zip(("red", "green", "blue"), bits, strict=True)), opts)
        took = time.perf_counter() - start
        widest = max(d.channels.values(), key=lambda c: c.best.bits).best
        print(f"| {volts} V | {'-'.join(map(str, bits))} | {topology} | {series} | {network_text(widest)} "
              f"| {float(widest.levels[-1]):.4f} V "
              f"| {float(widest.worst_dnl):.3f} / {float(widest.worst_inl):.3f} "
              f"| {max(float(a) for a in widest.pin_current_a) * 1000:.2f} mA "
              f"| {float(d.bank_current_a) * 1000:.1f} mA | {took:.2f} s |")


if __name__ == "__main__":
    main()
