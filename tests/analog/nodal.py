"""An independent nodal solve (numpy) of a resistor DAC, written from the circuit, not from synccore.

Pins are ideal sources (the bank voltage for a 1, 0 V for a 0) behind the pin's output
resistance.  Kirchhoff's current law at every inner node: G v = i (common practice).
"""

from __future__ import annotations

import numpy as np


def solve(edges: list[tuple[str, str, float]], pins: dict[str, float]) -> dict[str, float]:
    """Node voltages of ``edges`` (a, b, ohms); ``gnd`` is 0 V, ``pins`` are fixed voltages."""
    fixed = {"gnd": 0.0} | pins
    inner = sorted({n for a, b, _ in edges for n in (a, b)} - set(fixed))
    k = {n: i for i, n in enumerate(inner)}
    g = np.zeros((len(inner), len(inner)))
    rhs = np.zeros(len(inner))
    for a, b, r in edges:
        for me, other in ((a, b), (b, a)):
            if me in k:
                g[k[me], k[me]] += 1 / r
                if other in k:
                    g[k[me], k[other]] -= 1 / r
                else:
                    rhs[k[me]] += fixed[other] / r
    v = np.linalg.solve(g, rhs)
    return fixed | dict(zip(inner, v, strict=True))


def weighted_edges(legs: list[float], load: float, pin_ohm: float) -> list[tuple[str, str, float]]:
    """Pin i through its resistor (plus the pin's own) to the output; the load to ground."""
    return [(f"p{i}", "out", r + pin_ohm) for i, r in enumerate(legs)] + [("out", "gnd", load)]


def ladder_edges(leg: float, rung: float, bits: int, load: float,
                 pin_ohm: float) -> list[tuple[str, str, float]]:  # fmt: skip
    """R-2R: pin i → 2R → node i; nodes joined by R; 2R from node 0 to ground; output at the top node."""
    node = [f"m{i}" for i in range(bits - 1)] + ["out"]
    edges = [(node[0], "gnd", leg), ("out", "gnd", load)]
    for i in range(bits):
        edges.append((f"p{i}", node[i], leg + pin_ohm))
        if i + 1 < bits:
            edges.append((node[i], node[i + 1], rung))
    return edges


def levels(edges: list[tuple[str, str, float]], bits: int, v_io: float) -> list[float]:
    """The output voltage for every code, code 0 first."""
    return [solve(edges, {f"p{i}": v_io * (c >> i & 1) for i in range(bits)})["out"] for c in range(2**bits)]
