"""The independent reference (tests/link/tmds_reference.py) against the project's model.

Two readings of DVI 1.0 section 3.2, written apart, must agree everywhere; each
check names the section of the standard it rests on.
"""

from __future__ import annotations

import pytest

from synccore.model import tmds
from tests.link import tmds_reference as ref

ALL_CNT = range(-tmds.DISPARITY_BOUND, tmds.DISPARITY_BOUND + 1)


def test_data_words_agree_on_every_byte_and_disparity() -> None:
    """DVI 1.0 section 3.2.2 (encode flow chart): both encoders, every byte, every cnt -8..8."""
    for cnt in ALL_CNT:
        for d in range(256):
            assert ref.encode(1, 0, 0, d, cnt) == tmds.encode(1, 0, 0, d, cnt), (d, cnt)


@pytest.mark.parametrize("c1, c0", [(0, 0), (0, 1), (1, 0), (1, 1)])
def test_control_tokens_agree(c1: int, c0: int) -> None:
    """DVI 1.0 section 3.2.2: the four control tokens, and cnt back to 0 while DE = 0."""
    assert ref.encode(0, c0, c1, 0xA5, 6) == (tmds.CONTROL_TOKENS[(c1, c0)], 0)
    assert tmds.encode(0, c0, c1, 0xA5, 6) == (ref.token(c1, c0), 0)


def test_tokens_as_the_standard_prints_them() -> None:
    """DVI 1.0 section 3.2.2 prints q_out[0:9] bit 0 first: 0010101011 for C1C0 = 00 (from memory)."""
    assert format(ref.token(0, 0), "010b")[::-1] == "0010101011"
    assert ref.token(0, 0) == 0b1101010100

    # The tokens are told from data by their transitions: 7 or more within a token, at most
    # 5 within any data word (DVI 1.0 section 3.2, from memory).
    def transitions(word: int) -> int:
        bits = ref.bits_of(word, 10)
        return sum(a != b for a, b in zip(bits, bits[1:], strict=False))

    assert min(transitions(ref.token(*c)) for c in ref.TOKENS_WIRE_ORDER) >= 7
    assert max(transitions(w) for w in ref.data_words()) <= 5


def test_every_word_decodes_back() -> None:
    """DVI 1.0 section 3.2.3 (decode): every data word gives back its byte, at every cnt."""
    for cnt in ALL_CNT:
        for d in range(256):
            word = ref.encode_data(d, cnt)[0]
            assert ref.decode_data(word) == d
            assert tmds.decode(word) == tmds.Symbol("data", d)
    for (c1, c0), word in tmds.CONTROL_TOKENS.items():
        assert ref.control_of(word) == (c1, c0)
        assert tmds.decode(word) == tmds.Symbol("control", c1 * 2 + c0)


def test_decoders_agree_on_all_1024_words() -> None:
    """DVI 1.0 section 3.2.3: the model's decode table against the reference's encoder."""
    for word in range(1024):
        symbol = tmds.decode(word)
        if word in ref.data_words():
            assert symbol == tmds.Symbol("data", ref.decode_data(word)), hex(word)
        elif ref.control_of(word) is None:
            assert symbol.kind == "invalid", hex(word)


def test_460_distinct_data_words() -> None:
    """460 of the 1024 10-bit words carry data (from memory: DVI 1.0 section 3.2), none a token."""
    words = ref.data_words()
    assert len(words) == 460
    assert not words & {ref.token(*c) for c in ref.TOKENS_WIRE_ORDER}


def test_disparity_bound() -> None:
    """DVI 1.0 section 3.2.2 flow chart, searched exhaustively: cnt reaches exactly -8, -6, ..., +8."""
    assert ref.reachable() == tuple(range(-8, 9, 2))
    assert list(ref.reachable()) == tmds.reachable_disparities()
    assert max(abs(c) for c in ref.reachable()) == tmds.DISPARITY_BOUND
    # cnt is the ones minus the zeros of every word since the last control period.
    for cnt in ref.reachable():
        for d in range(256):
            word, nxt = ref.encode_data(d, cnt)
            assert nxt == cnt + ref.word_disparity(word)
