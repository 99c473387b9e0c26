"""TMDS coding as DVI 1.0 specifies it: the oracle of the encoders, the link benches and the sink.

DVI 1.0, section 3.2 ("TMDS encoding algorithm", the flow chart of figure 3-5):

* while DE = 1, 8 data bits D become a 9-bit word q_m by a transition-minimising
  stage: q_m[0] = D[0], then each bit is the XNOR (when D has more than four ones,
  or exactly four and D[0] = 0) or the XOR (otherwise) of the previous q_m bit and
  the next D bit; q_m[8] is 0 for XNOR, 1 for XOR;
* a DC-balancing stage then sends q_m[7:0] as it is or inverted, with q_out[8] =
  q_m[8] and q_out[9] = 1 when inverted, steered by the running disparity ``cnt``
  (ones minus zeros sent so far) so that the line stays balanced;
* while DE = 0, one of four control tokens is sent for C1C0, and ``cnt`` returns to 0.

Bit 0 of a word is the first bit on the wire.  ``cnt`` is counted here as the
flow chart counts it; it equals the ones minus the zeros of every 10-bit word
sent since the last control period, and the algorithm keeps it within
:data:`DISPARITY_BOUND` (an exhaustive search over every reachable state and every
byte, :func:`reachable_disparities`, finds exactly -8, -6, ..., +8).

Channel 0 carries HSYNC as C0 and VSYNC as C1 and the blue byte; channel 1 green,
channel 2 red, both with C0 = C1 = 0 (DVI signalling, which HDMI sinks accept).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, TypeVar

import numpy as np

CONTROL_TOKENS: dict[tuple[int, int], int] = {
    # (C1, C0): the token as a number whose bit 0 is the first bit on the wire.  DVI 1.0
    # section 3.2.2 writes them as q_out[0:9] = 0010101011, 1101010100, 0010101010 and
    # 1101010101 for C1C0 = 00, 01, 10, 11, bit 0 leftmost; read right to left here.
    (0, 0): 0b1101010100,
    (0, 1): 0b0010101011,
    (1, 0): 0b0101010100,
    (1, 1): 0b1010101011,
}

TOKEN_OF: dict[int, tuple[int, int]] = {word: c for c, word in CONTROL_TOKENS.items()}
"""(C1, C0) of each control token."""

DISPARITY_BOUND = 8
"""|cnt| never exceeds 8 (even values only): see :func:`reachable_disparities`."""

DISPARITY_BITS = 5
"""Two's complement bits that hold cnt (-8..+8)."""

WORD_BITS = 10


def ones(value: int, bits: int = 8) -> int:
    """The number of ones among the low ``bits`` bits of ``value``."""
    return bin(value & ((1 << bits) - 1)).count("1")


def minimise(d: int) -> int:
    """The transition-minimising stage: the 9-bit q_m of data byte ``d`` (DVI 1.0, 3.2.2)."""
    n1 = ones(d)
    use_xnor = n1 > 4 or (n1 == 4 and d & 1 == 0)
    q = d & 1
    previous = q
    for i in range(1, 8):
        bit = (previous ^ (d >> i)) & 1
        if use_xnor:
            bit ^= 1
        q |= bit << i
        previous = bit
    return q | (0 if use_xnor else 1 << 8)


def balance(q_m: int, cnt: int) -> tuple[int, int]:
    """The DC-balancing stage: the 10-bit word for ``q_m`` and the running disparity after it."""
    n1 = ones(q_m)
    n0 = 8 - n1
    q8 = (q_m >> 8) & 1
    low = q_m & 0xFF
    inverted = (~low & 0xFF) | (q8 << 8) | (1 << 9)
    straight = low | (q8 << 8)
    if cnt == 0 or n1 == n0:
        if q8:
            return straight, cnt + (n1 - n0)
        return inverted, cnt + (n0 - n1)
    if (cnt > 0 and n1 > n0) or (cnt < 0 and n0 > n1):
        return inverted, cnt + 2 * q8 + (n0 - n1)
    return straight, cnt - 2 * (1 - q8) + (n1 - n0)


def encode(de: int, c0: int, c1: int, d: int, cnt: int) -> tuple[int, int]:
    """One symbol: the 10-bit word for (DE, C0, C1, D) after disparity ``cnt``, and the next cnt."""
    if not de:
        return CONTROL_TOKENS[(c1 & 1, c0 & 1)], 0
    return balance(minimise(d & 0xFF), cnt)


def encode_stream(de: np.ndarray, c0: np.ndarray, c1: np.ndarray, d: np.ndarray,
                  cnt: int = 0) -> tuple[np.ndarray, np.ndarray]:  # fmt: skip
    """:func:`encode` over a sequence: the words and the disparity after each.

    The disparity has 9 states and the data byte 256 values, so the stage is one
    table lookup per symbol (:data:`_NEXT`), built once from :func:`encode`.
    """
    n = len(de)
    words = np.empty(n, dtype=np.int64)
    after = np.empty(n, dtype=np.int64)
    for i in range(n):  # the disparity chains from symbol to symbol: no vector form
        if de[i]:
            k = (cnt + DISPARITY_BOUND) // 2
            words[i] = _WORD[k, d[i]]
            cnt = int(_NEXT[k, d[i]])
        else:
            words[i] = CONTROL_TOKENS[(int(c1[i]) & 1, int(c0[i]) & 1)]
            cnt = 0
        after[i] = cnt
    return words, after


def reachable_disparities() -> list[int]:
    """Every disparity the encoder can reach from 0, by exhaustive search over all bytes."""
    seen = {0}
    todo = [0]
    while todo:
        cnt = todo.pop()
        for d in range(256):
            _, nxt = balance(minimise(d), cnt)
            if nxt not in seen:
                seen.add(nxt)
                todo.append(nxt)
    return sorted(seen)


def _tables() -> tuple[np.ndarray, np.ndarray]:
    states = range(-DISPARITY_BOUND, DISPARITY_BOUND + 1, 2)
    word = np.zeros((len(states), 256), dtype=np.int64)
    nxt = np.zeros((len(states), 256), dtype=np.int64)
    for k, cnt in enumerate(states):
        for d in range(256):
            word[k, d], nxt[k, d] = balance(minimise(d), cnt)
    return word, nxt


_WORD, _NEXT = _tables()


@dataclass(frozen=True)
class Symbol:
    """A decoded 10-bit word: ``kind`` is ``data`` (``value`` the byte), ``control``
    (``value`` = C1 * 2 + C0) or ``invalid`` (no data encoding gives it)."""

    kind: str
    value: int


def decode(word: int) -> Symbol:
    """What a sink reads from ``word`` (bit 0 first on the wire); DVI 1.0 section 3.2.3."""
    word &= 0x3FF
    if word in TOKEN_OF:
        c1, c0 = TOKEN_OF[word]
        return Symbol("control", c1 * 2 + c0)
    kind, value = int(DECODE_KIND[word]), int(DECODE_VALUE[word])
    return Symbol("data" if kind == DATA else "invalid", value)


CONTROL, DATA, INVALID = 0, 1, 2
"""Kinds in :data:`DECODE_KIND`."""


def _decode_tables() -> tuple[np.ndarray, np.ndarray]:
    """For every 10-bit word: its kind and value, found by running the encoder over
    every byte and every disparity (a word the encoder never sends is invalid)."""
    kind = np.full(1 << WORD_BITS, INVALID, dtype=np.int64)
    value = np.zeros(1 << WORD_BITS, dtype=np.int64)
    for k in range(_WORD.shape[0]):
        for d in range(256):
            kind[_WORD[k, d]] = DATA
            value[_WORD[k, d]] = d
    for (c1, c0), word in CONTROL_TOKENS.items():
        kind[word] = CONTROL
        value[word] = c1 * 2 + c0
    return kind, value


DECODE_KIND, DECODE_VALUE = _decode_tables()
"""Vector decoding: ``DECODE_KIND[words]`` and ``DECODE_VALUE[words]`` for numpy arrays of words."""


Level = TypeVar("Level", int, "np.ndarray[Any, Any]")


def eight_bit(level: Level, bits: int) -> Level:
    """A colour level of ``bits`` bits on the 8-bit scale TMDS carries: round(level * 255 / (2**bits - 1)).

    The one rule for it: the link core's tables and the simulated monitor's PNGs both use
    it, so a DVI picture and a VGA picture of one design are equal pixel for pixel
    (2**bits - 1 is odd: no ties).  ``level`` is a number or a numpy array of them.
    """
    full = (1 << bits) - 1
    return (level * 255 + full // 2) // full
