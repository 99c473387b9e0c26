"""An independent TMDS encoder and decoder for the tests, written from DVI 1.0 itself.

Written from the flow chart of DVI 1.0 section 3.2.2 ("T.M.D.S. encode algorithm")
and the decode description of section 3.2.3 (from memory), bit by bit as the chart
draws it (bit lists, q_m[0] first), and deliberately not from (nor importing)
:mod:`synccore.model.tmds`: the tests compare the two, so that a slip in either
shows.  The emitted encoders are then checked against this one.
"""

from __future__ import annotations

from functools import cache

# DVI 1.0 section 3.2.2: the control tokens as the standard prints them, q_out[0:9],
# bit 0 first (the order on the wire).  Keys are (C1, C0).
TOKENS_WIRE_ORDER = {
    (0, 0): "0010101011",
    (0, 1): "1101010100",
    (1, 0): "0010101010",
    (1, 1): "1101010101",
}


def bits_of(value: int, n: int) -> list[int]:
    """``value`` as a list of ``n`` bits, bit 0 first."""
    return [(value >> i) & 1 for i in range(n)]


def value_of(bits: list[int]) -> int:
    """The number whose bit i is ``bits[i]``."""
    return sum(b << i for i, b in enumerate(bits))


def token(c1: int, c0: int) -> int:
    """The control token for C1C0 as a number (bit 0 = first bit on the wire)."""
    return value_of([int(ch) for ch in TOKENS_WIRE_ORDER[(c1, c0)]])


def encode_data(d: int, cnt: int) -> tuple[int, int]:
    """DVI 1.0 figure "T.M.D.S. encode algorithm", the DE = 1 path: (q_out, Cnt(t))."""
    D = bits_of(d, 8)
    n1_d = sum(D)
    q_m = [D[0]]
    if n1_d > 4 or (n1_d == 4 and D[0] == 0):
        for i in range(1, 8):
            q_m.append(1 - (q_m[i - 1] ^ D[i]))  # XNOR
        q_m.append(0)
    else:
        for i in range(1, 8):
            q_m.append(q_m[i - 1] ^ D[i])  # XOR
        q_m.append(1)
    n1 = sum(q_m[:8])
    n0 = 8 - n1
    low = q_m[:8]
    inv = [1 - b for b in low]
    if cnt == 0 or n1 == n0:
        q_out = [*(low if q_m[8] else inv), q_m[8], 1 - q_m[8]]
        cnt = cnt + (n1 - n0) if q_m[8] == 1 else cnt + (n0 - n1)
    elif (cnt > 0 and n1 > n0) or (cnt < 0 and n0 > n1):
        q_out = [*inv, q_m[8], 1]
        cnt = cnt + 2 * q_m[8] + (n0 - n1)
    else:
        q_out = [*low, q_m[8], 0]
        cnt = cnt - 2 * (1 - q_m[8]) + (n1 - n0)
    return value_of(q_out), cnt


def encode(de: int, c0: int, c1: int, d: int, cnt: int) -> tuple[int, int]:
    """One symbol of the flow chart: while DE = 0 the token and Cnt = 0."""
    if not de:
        return token(c1, c0), 0
    return encode_data(d, cnt)


def decode_data(word: int) -> int:
    """DVI 1.0 section 3.2.3: the byte a data word carries (q_out[9] undoes the
    inversion, q_out[8] says XOR or XNOR); any 10-bit word gives some byte."""
    q = bits_of(word, 10)
    low = [1 - b for b in q[:8]] if q[9] else q[:8]
    D = [low[0]]
    for i in range(1, 8):
        x = low[i] ^ low[i - 1]
        D.append(x if q[8] else 1 - x)
    return value_of(D)


def control_of(word: int) -> tuple[int, int] | None:
    """(C1, C0) when ``word`` is a control token, else None."""
    for c, _ in TOKENS_WIRE_ORDER.items():
        if token(*c) == word:
            return c
    return None


def word_disparity(word: int) -> int:
    """Ones minus zeros of a 10-bit word."""
    n1 = bin(word & 0x3FF).count("1")
    return n1 - (10 - n1)


@cache
def reachable() -> tuple[int, ...]:
    """Every Cnt the flow chart reaches from 0 over any bytes (exhaustive search)."""
    seen, todo = {0}, [0]
    while todo:
        cnt = todo.pop()
        for d in range(256):
            nxt = encode_data(d, cnt)[1]
            if nxt not in seen:
                seen.add(nxt)
                todo.append(nxt)
    return tuple(sorted(seen))


@cache
def data_words() -> frozenset[int]:
    """Every word the encoder sends while DE = 1."""
    return frozenset(encode_data(d, cnt)[0] for cnt in reachable() for d in range(256))


@cache
def table() -> dict[tuple[int, int], tuple[int, int]]:
    """(cnt, byte) -> (word, next cnt) over every reachable cnt: the benches' fast path."""
    return {(cnt, d): encode_data(d, cnt) for cnt in reachable() for d in range(256)}
