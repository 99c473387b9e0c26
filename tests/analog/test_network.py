"""The exact nodal solver against closed forms (Kirchhoff, Thevenin) and an independent numpy solve."""

from __future__ import annotations

import itertools
from fractions import Fraction

from hypothesis import given, settings
from hypothesis import strategies as st

from synccore.analog import DacOptions, analyse, node_voltages, r2r, weighted
from synccore.analog.network import GROUND, OUT, Branch, Network
from tests.analog import nodal

V = Fraction(33, 10)


def _unloaded_weighted(r: Fraction) -> Network:
    return Network(3, tuple(Branch(f"R{i}", f"pin{i}", OUT, r / 2**i) for i in range(3)))


def test_unloaded_weighted_three_bits() -> None:
    # Kirchhoff's current law at the output node with conductances 1:2:4 and no load:
    # V = (4·b2 + 2·b1 + b0)/7 × V_io (common practice)
    net = _unloaded_weighted(Fraction(2000))
    for b2, b1, b0 in itertools.product((0, 1), repeat=3):
        high = [i for i, b in enumerate((b0, b1, b2)) if b]
        assert node_voltages(net, high, V)[OUT] == Fraction(4 * b2 + 2 * b1 + b0, 7) * V


def test_loaded_weighted_is_its_thevenin_equivalent() -> None:
    # Thevenin: the open-circuit voltage above behind R/7 (R, R/2, R/4 in parallel), into 75 ohm.
    r, load = Fraction(1950), Fraction(75)
    net = weighted([r, r / 2, r / 4], load, Fraction(0))
    r_th = r / 7
    for code in range(8):
        high = [i for i in range(3) if code >> i & 1]
        assert node_voltages(net, high, V)[OUT] == Fraction(code, 7) * V * load / (load + r_th)


def test_r2r_ladder_thevenin() -> None:
    # An ideal R-2R ladder gives V_io × code / 2^n behind R (common practice).
    rr, load = Fraction(240), Fraction(75)
    ideal = r2r(2 * rr, rr, 4, Fraction(10) ** 30, Fraction(0))
    loaded = r2r(2 * rr, rr, 4, load, Fraction(0))
    for code in range(16):
        high = [i for i in range(4) if code >> i & 1]
        unloaded = node_voltages(ideal, high, V)[OUT]
        assert abs(unloaded - V * code / 16) < Fraction(1, 10**20)
        assert node_voltages(loaded, high, V)[OUT] == V * Fraction(code, 16) * load / (load + rr)


def test_ground_and_pins_are_known() -> None:
    v = node_voltages(weighted([Fraction(1000)], Fraction(75), Fraction(0)), [0], V)
    assert v[GROUND] == 0 and v["pin0"] == V


ohm = st.integers(min_value=10, max_value=100_000).map(Fraction)


@settings(max_examples=60, deadline=None)
@given(bits=st.integers(1, 5), legs=st.lists(ohm, min_size=5, max_size=5), load=ohm,
       pin=st.integers(0, 60).map(Fraction), io=st.sampled_from(["1.8", "2.5", "3.3"]))  # fmt: skip
def test_weighted_levels_match_numpy(bits: int, legs: list[Fraction], load: Fraction, pin: Fraction,
                                     io: str) -> None:  # fmt: skip
    opts = DacOptions(io_v=Fraction(io), load_ohm=load, pin_ohm=pin)
    ch = analyse("red", weighted(legs[:bits], load, pin), opts)
    want = nodal.levels(nodal.weighted_edges([float(r) for r in legs[:bits]], float(load), float(pin)),
                        bits, float(io))  # fmt: skip
    assert [float(v) for v in ch.levels] == _close(want)


@settings(max_examples=60, deadline=None)
@given(bits=st.integers(1, 6), leg=ohm, rung=ohm, load=ohm, pin=st.integers(0, 60).map(Fraction))
def test_ladder_levels_match_numpy(bits: int, leg: Fraction, rung: Fraction, load: Fraction,
                                   pin: Fraction) -> None:  # fmt: skip
    opts = DacOptions(io_v=V, load_ohm=load, pin_ohm=pin)
    ch = analyse("red", r2r(leg, rung, bits, load, pin), opts)
    want = nodal.levels(nodal.ladder_edges(float(leg), float(rung), bits, float(load), float(pin)), bits, 3.3)
    assert [float(v) for v in ch.levels] == _close(want)


class _close(list[float]):
    """A list that equals another within 1e-9 relative (numpy's floats against exact fractions)."""

    def __eq__(self, other: object) -> bool:
        return isinstance(other, list) and len(other) == len(self) and all(
            abs(a - b) <= 1e-9 * max(1.0, abs(b)) for a, b in zip(other, self, strict=True))

    __hash__ = None  # type: ignore[assignment]
