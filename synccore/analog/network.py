"""Resistor networks from FPGA pins into the monitor's load, solved exactly by nodal analysis.

A network is a list of branches (one resistor each) between named nodes: ``gnd``,
the pins ``pin0``, ``pin1``, ... (ideal sources at the bank voltage when their bit
is 1 and at 0 V when it is 0, each behind the pin's output resistance) and inner
nodes, one of them ``out`` (the monitor's input).  Kirchhoff's current law at every
inner node gives G·v = i, solved over fractions, so every figure is exact.

The network is linear and a low pin is a path to ground, so the voltage of any node
for a code is the sum of its voltages with each set bit alone (superposition): the
designer solves one network per bit, not one per code.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction

GROUND = "gnd"
OUT = "out"


def pin(i: int) -> str:
    return f"pin{i}"


@dataclass(frozen=True)
class Branch:
    """One resistor between two nodes; ``extra_ohm`` is the pin's output resistance in series."""

    name: str
    a: str
    b: str
    ohm: Fraction
    extra_ohm: Fraction = Fraction(0)

    @property
    def total_ohm(self) -> Fraction:
        return self.ohm + self.extra_ohm


@dataclass(frozen=True)
class Network:
    bits: int
    branches: tuple[Branch, ...]

    @property
    def inner(self) -> tuple[str, ...]:
        """The unknown nodes, ``out`` first, in the order branches name them."""
        names = [OUT]
        for br in self.branches:
            for node in (br.a, br.b):
                if node not in names and node != GROUND and not node.startswith("pin"):
                    names.append(node)
        return tuple(names)


def weighted(legs: Sequence[Fraction], load: Fraction, pin_ohm: Fraction) -> Network:
    """Binary-weighted: pin i through ``legs[i]`` straight to the output node."""
    branches = [Branch(f"R{i}", pin(i), OUT, r, pin_ohm) for i, r in enumerate(legs)]
    return Network(len(legs), (*branches, Branch("load", OUT, GROUND, load)))


def r2r(leg: Fraction, ladder: Fraction, bits: int, load: Fraction, pin_ohm: Fraction) -> Network:
    """R-2R ladder: pin i through a leg (2R) to rung i, rungs joined by R, a 2R termination
    to ground at bit 0's rung, the output at the most significant bit's rung."""
    rung = [f"n{i}" for i in range(bits - 1)] + [OUT]
    branches = [Branch("termination", rung[0], GROUND, leg)]
    for i in range(bits):
        branches.append(Branch(f"leg{i}", pin(i), rung[i], leg, pin_ohm))
        if i + 1 < bits:
            branches.append(Branch(f"ladder{i}", rung[i], rung[i + 1], ladder))
    return Network(bits, (*branches, Branch("load", OUT, GROUND, load)))


def node_voltages(net: Network, high: Sequence[int], v_io: Fraction) -> dict[str, Fraction]:
    """Every node's voltage with the pins in ``high`` at ``v_io`` and the others at 0 V."""
    inner = net.inner
    index = {name: k for k, name in enumerate(inner)}
    known = {GROUND: Fraction(0)} | {pin(i): (v_io if i in high else Fraction(0)) for i in range(net.bits)}
    n = len(inner)
    g = [[Fraction(0)] * n for _ in range(n)]
    rhs = [Fraction(0)] * n
    for br in net.branches:
        cond = 1 / br.total_ohm
        ends = [index.get(br.a), index.get(br.b)]
        for k, other, other_node in ((ends[0], ends[1], br.b), (ends[1], ends[0], br.a)):
            if k is None:
                continue
            g[k][k] += cond
            if other is None:
                rhs[k] += cond * known[other_node]
            else:
                g[k][other] -= cond
    solved = _solve(g, rhs)
    return known | dict(zip(inner, solved, strict=True))


def _solve(g: list[list[Fraction]], rhs: list[Fraction]) -> list[Fraction]:
    """Gaussian elimination with exact pivots (the matrix is symmetric positive definite)."""
    n = len(rhs)
    a = [row[:] + [rhs[k]] for k, row in enumerate(g)]
    for col in range(n):
        piv = next(r for r in range(col, n) if a[r][col] != 0)
        a[col], a[piv] = a[piv], a[col]
        for r in range(col + 1, n):
            f = a[r][col] / a[col][col]
            if f:
                a[r] = [x - f * y for x, y in zip(a[r], a[col], strict=True)]
    out = [Fraction(0)] * n
    for r in range(n - 1, -1, -1):
        out[r] = (a[r][n] - sum(a[r][c] * out[c] for c in range(r + 1, n))) / a[r][r]
    return out
