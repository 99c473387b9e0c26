"""Judging an encoder's output stream against the independent reference, by class of fault.

:func:`expected` runs the pipeline of the link contract in Python (two advancing
cycles of latency, reset to the C1C0 = 00 token, the running disparity shared by
the ppc pixels of a cycle) with the words of :mod:`tests.link.tmds_reference`.
:func:`findings` compares every cycle's words and names what is wrong:

* ``control token for C1C0=xy``: a blanking word differs from the token;
* ``transition-minimising stage``: a data word decodes (DVI 1.0 section 3.2.3) to
  another byte than the one sent;
* ``DC balance``: a data word decodes right but its inversion is not the one the
  running disparity calls for, or the running disparity of the sent words leaves
  -8 .. +8;
* ``unknown``: q_out undefined (X) after reset;
* ``decode``: a word equal to the reference's that does not decode to its input
  (a cross-check of the reference itself).

Classes are listed in the order of their first fault: the first is the root cause,
later ones may follow from it (a wrong q_m also misleads the disparity).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from tests.link import tmds_reference as ref
from tests.link.encoder_bench import Stimulus

BOUND = 8  # |running disparity| <= 8: exhaustive search of the flow chart (test_tmds_reference)
_CONTROL = {ref.token(c1, c0): (c1, c0) for c1 in (0, 1) for c0 in (0, 1)}
_DECODE = [ref.decode_data(w) for w in range(1024)]
_DISPARITY = [ref.word_disparity(w) for w in range(1024)]


@dataclass
class Expected:
    word: list[list[int]]  # per cycle and pixel; -1 before the first reset
    source: list[int]  # the input cycle the words came from; -1: the reset state
    cnt_before: list[list[int]]  # running disparity before each word
    fresh: list[bool]  # the words of this cycle were clocked out by the edge before it
    reached: set[int] = field(default_factory=set)  # every running disparity reached


def _pixel(stim: Stimulus, src: int, k: int) -> tuple[int, int, int, int]:
    """(de, c1, c0, d) of pixel k of input cycle ``src``; the reset state for -1."""
    if src < 0:
        return 0, 0, 0, 0
    j = src * stim.ppc + k
    return int(stim.de[j]), int(stim.c1[j]), int(stim.c0[j]), int(stim.d[j])


def expected(stim: Stimulus) -> Expected:
    table = ref.table()
    tokens = {(c1, c0): ref.token(c1, c0) for c1 in (0, 1) for c0 in (0, 1)}
    ppc = stim.ppc
    rst, ce = stim.rst.tolist(), stim.ce.tolist()
    out = Expected([], [], [], [])
    known, q, src, before, s1, cnt, fresh = False, [-1] * ppc, -1, [0] * ppc, -1, 0, False
    for i in range(stim.cycles):
        out.word.append(q)
        out.source.append(src)
        out.cnt_before.append(before)
        out.fresh.append(fresh)
        fresh = False
        if rst[i]:
            known, s1, src, cnt, fresh = True, -1, -1, 0, True
            q, before = [tokens[(0, 0)]] * ppc, [0] * ppc
        elif ce[i] and known:
            q, before = [], []
            for k in range(ppc):
                de, c1, c0, d = _pixel(stim, s1, k)
                before.append(cnt)
                if de:
                    word, cnt = table[(cnt, d)]
                else:
                    word, cnt = tokens[(c1, c0)], 0
                q.append(word)
                out.reached.add(cnt)
            src, s1, fresh = s1, i, True
    return out


class Findings(dict[str, list[str]]):
    """Class of fault -> messages (the first few kept), with the count of each."""

    def __init__(self) -> None:
        super().__init__()
        self.count: dict[str, int] = {}

    def add(self, key: str, message: str) -> None:
        self.count[key] = self.count.get(key, 0) + 1
        if len(self.setdefault(key, [])) < 3:
            self[key].append(message)

    def summary(self) -> str:
        return "\n".join(f"{key}: {self.count[key]} words, e.g. {msgs[0]}" for key, msgs in self.items())


def classify(pixel: tuple[int, int, int, int], got: int, want: int, cnt: int) -> tuple[str, str]:
    """The class of fault and a message for word ``got`` sent where ``want`` was due."""
    de, c1, c0, d = pixel
    if not de:
        key = f"control token for C1C0={c1}{c0}"
        return key, f"{key}: got {got:010b}, expected {want:010b}"
    if _CONTROL.get(got) is not None:
        key = "transition-minimising stage"
        return key, f"{key}: a control token {got:010b} where the byte 0x{d:02x} was due"
    decoded = _DECODE[got]
    if decoded != d:
        key = "transition-minimising stage"
        return key, f"{key}: word decodes to 0x{decoded:02x} not 0x{d:02x}"
    key = "DC balance"
    return key, (f"{key}: running disparity {cnt:+d} before the word: sent {got:010b} "
                 f"({_DISPARITY[got]:+d}), due {want:010b} ({_DISPARITY[want]:+d})")  # fmt: skip


def findings(stim: Stimulus, got: np.ndarray, exp: Expected | None = None) -> Findings:
    """Every fault of ``got`` (per cycle and pixel) against the reference, by class."""
    exp = exp or expected(stim)
    found = Findings()
    rows = got.tolist()
    for i in range(1, stim.cycles):
        for k in range(stim.ppc):
            want, have = exp.word[i][k], rows[i][k]
            if want < 0 or have == want:
                continue
            if have < 0:
                found.add("unknown", f"unknown: q_out undefined at cycle {i}")
                continue
            key, message = classify(_pixel(stim, exp.source[i], k), have, want, exp.cnt_before[i][k])
            found.add(key, f"{message} (cycle {i}, pixel {k})")
    _check_stream(stim, rows, exp, found)
    return found


def _check_stream(stim: Stimulus, rows: list[list[int]], exp: Expected, found: Findings) -> None:
    """The words as sent (one per advance): each decodes to its input, and the running
    disparity (ones minus zeros since the last token) stays within the bound."""
    run = 0
    for i in range(1, stim.cycles):
        if not exp.fresh[i] or exp.word[i][0] < 0:
            continue
        for k in range(stim.ppc):
            word = rows[i][k]
            if word < 0:
                continue
            reported = word != exp.word[i][k]  # already classified by the comparison
            de, c1, c0, d = _pixel(stim, exp.source[i], k)
            control = _CONTROL.get(word)
            if control is not None:
                run = 0
                if not reported and (de or control != (c1, c0)):
                    found.add("decode", f"decode: cycle {i} pixel {k} reads as control {control}")
                continue
            run += _DISPARITY[word]
            if abs(run) > BOUND:
                found.add("DC balance", f"DC balance: running disparity of the sent words reaches "
                                        f"{run:+d}, beyond ±{BOUND} (cycle {i}, pixel {k})")  # fmt: skip
            if not reported and (not de or _DECODE[word] != d):
                found.add("decode", f"decode: cycle {i} pixel {k} reads as 0x{_DECODE[word]:02x}")
