"""A simulated DVI sink: from three TMDS lanes to the pins a monitor reads, with findings on the link.

A sink does not know where a 10-bit symbol starts.  It finds out from the control
tokens of the blanking periods: they are the only symbols with that many
transitions, so the bit offset at which tokens appear is the symbol boundary
(DVI 1.0, section 3.2.3, and common practice in receivers).  This sink does the
same on each lane's bit stream (bit 0 of each symbol first), and also tries the
reversed bit order, so a transmitter that sends bit 9 first is named rather than
shown as noise.  Then it:

* finds the lane whose control tokens change (HSYNC/VSYNC ride on C0/C1 of
  channel 0): any other lane than 0 is a swapped lane;
* compares where each lane's data periods start: a lane late or early against
  lane 0 is skew (de misaligned between the channels);
* counts symbols that no encoder sends, and control tokens other than C1C0 = 00
  on channels 1 and 2;
* decodes: de where lane 0 carries data, HSYNC and VSYNC from lane 0's last
  token (held through the data period, as a sink holds them), blue, green and
  red from lanes 0, 1 and 2 (8 bits each).

The result is the :class:`~synccore.picture.run.Pins` the simulated monitor
reads like a VGA input's, and the findings, each naming its fault.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from synccore.model.tmds import CONTROL, CONTROL_TOKENS, DATA, DECODE_KIND, DECODE_VALUE, INVALID, WORD_BITS
from synccore.picture.monitor import count
from synccore.picture.run import Pins

ALIGN_SYMBOLS = 40_000
"""Symbols of each lane searched for the symbol boundary: more than a line of any mode."""

MAX_SKEW = 32
"""Symbols by which lanes are compared for skew, either way."""

_WEIGHTS = (1 << np.arange(WORD_BITS)).astype(np.int64)
_TOKENS = np.array(sorted(CONTROL_TOKENS.values()), dtype=np.int64)


@dataclass(frozen=True)
class Lanes:
    """What the sink receives: each lane's symbols in time order, one per pixel."""

    period_s: float  # the pixel period
    words: np.ndarray  # (3, n): lane k's symbols as numbers, bit 0 first on the wire
    source: str  # what was sampled, for the report: "serial lanes" or "encoder words"
    clock_bits: np.ndarray | None = None  # the clock lane's bit stream, when the pins were sampled


@dataclass
class Reception:
    """What the sink made of the lanes."""

    pins: Pins | None
    problems: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    boundary: int | None = None  # lane 0's symbol boundary, in bits into its stream


def serial_bits(words: np.ndarray) -> np.ndarray:
    """A lane's bit stream, bit 0 of each symbol first."""
    return ((words[:, None] >> np.arange(WORD_BITS)) & 1).astype(np.uint8).reshape(-1)


def lanes_from_bits(bits: np.ndarray, period_s: float, source: str, *,
                    clock_bits: np.ndarray | None = None) -> Lanes:  # fmt: skip
    """Lanes from each lane's sampled bit stream ((3, m) of 0/1, in time order).

    The bits are packed ten to a number from the first sampled bit, wherever the sampling
    began: these numbers are not yet symbols, and :func:`receive` finds the boundary from
    the control tokens.  ``clock_bits`` (the clock lane's stream) is checked against the
    boundary the data lanes show.
    """
    count = bits.shape[1] // WORD_BITS
    cut = bits[:, : count * WORD_BITS].reshape(3, count, WORD_BITS).astype(np.int64)
    return Lanes(period_s, cut @ _WEIGHTS, source, clock_bits)


def symbols(bits: np.ndarray, offset: int, reverse: bool) -> np.ndarray:
    """The symbols of a bit stream cut at ``offset``, read bit 0 first (or last, ``reverse``)."""
    count = (len(bits) - offset) // WORD_BITS
    cut = bits[offset : offset + count * WORD_BITS].reshape(count, WORD_BITS).astype(np.int64)
    if reverse:
        cut = cut[:, ::-1]
    return cut @ _WEIGHTS


def find_boundary(bits: np.ndarray) -> tuple[int, bool, int]:
    """(offset, reversed, tokens found) of the cut that shows the most control tokens."""
    head = bits[: ALIGN_SYMBOLS * WORD_BITS]
    best = (0, False, -1)
    for reverse in (False, True):
        for offset in range(WORD_BITS):
            found = int(np.isin(symbols(head, offset, reverse), _TOKENS).sum())
            if found > best[2]:
                best = (offset, reverse, found)
    return best


def _align(lanes: Lanes, rec: Reception) -> np.ndarray | None:
    """Each lane's symbols cut at the boundary its tokens show; None when a lane shows none."""
    out = []
    rec.boundary = None
    for k in range(3):
        words = lanes.words[k]
        bits = serial_bits(words[:ALIGN_SYMBOLS])
        offset, reverse, found = find_boundary(bits)
        if found == 0:
            rec.problems.append(f"lane {k}: no control token at any bit offset: the sink cannot find "
                                "where a symbol starts (no blanking, or not TMDS)")  # fmt: skip
            return None
        if reverse:
            rec.problems.append(f"lane {k}: bit order reversed: the control tokens arrive bit 9 first; "
                                "TMDS sends bit 0 of each symbol first (DVI 1.0, section 3.2)")  # fmt: skip
        if offset:
            rec.notes.append(f"lane {k}: symbols start {offset} bits into the stream (found from the "
                             "control tokens)")  # fmt: skip
        if k == 0:
            rec.boundary = offset
        if offset or reverse:
            words = symbols(serial_bits(words), offset, reverse)
        out.append(words)
    n = min(len(w) for w in out)
    return np.stack([w[:n] for w in out])


def _check_roles(words: np.ndarray, rec: Reception) -> None:
    """The syncs on lane 0 only; channels 1 and 2 send C1C0 = 00."""
    kinds = DECODE_KIND[words]
    values = np.where(kinds == CONTROL, DECODE_VALUE[words], 0)
    changing = [k for k in range(3) if len(np.unique(values[k][kinds[k] == CONTROL])) > 1]
    if changing and 0 not in changing:
        rec.problems.append(f"lanes swapped: the sync tokens (C0/C1 changing) arrive on lane {changing[0]}; "
                            "DVI carries HSYNC and VSYNC on channel 0 (tmds_data[0], blue)")  # fmt: skip
    for k in (1, 2):
        sent = set(np.unique(values[k][kinds[k] == CONTROL]).tolist())
        if sent == {1}:  # the C1C0 = 00 token read backwards is the 01 token
            rec.problems.append(f"lane {k}: bit order reversed: every control token reads C1C0 = 01, the "
                                "00 token bit 9 first; TMDS sends bit 0 of each symbol first (DVI 1.0, "
                                "section 3.2)")  # fmt: skip
        elif sent - {0}:
            rec.problems.append(f"lane {k}: control tokens other than C1C0 = 00 (DVI sends 00 on "
                                "channels 1 and 2)")  # fmt: skip
    for k in range(3):
        bad = int((kinds[k] == INVALID).sum())
        if bad:
            first = int(np.flatnonzero(kinds[k] == INVALID)[0])
            rec.problems.append(f"lane {k}: {count(bad, 'symbol')} no TMDS encoder sends, first at "
                                f"symbol {first} ({int(words[k][first]):#05x})")  # fmt: skip


def _skew(de0: np.ndarray, dek: np.ndarray) -> int:
    """The shift of ``dek`` against ``de0`` (positive: late) that makes them agree best."""
    n = len(de0) - 2 * MAX_SKEW
    if n <= 0:
        return 0
    base = de0[MAX_SKEW : MAX_SKEW + n]
    scores = [int((dek[MAX_SKEW + s : MAX_SKEW + s + n] != base).sum())
              for s in range(-MAX_SKEW, MAX_SKEW + 1)]  # fmt: skip
    best = min(range(len(scores)), key=lambda i: (scores[i], abs(i - MAX_SKEW)))
    return best - MAX_SKEW


def _check_skew(words: np.ndarray, rec: Reception) -> None:
    de = DECODE_KIND[words] == DATA
    for k in (1, 2):
        s = _skew(de[0], de[k])
        if s:
            rec.problems.append(f"lane {k} is {abs(s)} symbol{'s' if abs(s) != 1 else ''} "
                                f"{'late' if s > 0 else 'early'} against lane 0: the channels' data "
                                "periods (de) do not line up")  # fmt: skip


def _held(values: np.ndarray, control: np.ndarray) -> np.ndarray:
    """Each control value held through the data periods that follow it (the first one before it)."""
    first = int(np.argmax(control)) if control.any() else 0
    idx = np.where(control, np.arange(len(values)), first)
    np.maximum.accumulate(idx, out=idx)
    return values[idx]


CLOCK_SYMBOL = 0b0000011111
"""The clock lane's symbol (contract; bit 0 first: five ones, then five zeros): one pixel
clock period per symbol, its rising edge on the data lanes' symbol boundary."""


def _check_clock(bits: np.ndarray, boundary: int, rec: Reception) -> None:
    """The clock lane carries the pixel clock, rising where the data symbols start."""
    head = bits[: ALIGN_SYMBOLS * WORD_BITS]
    steady = [o for o in range(WORD_BITS) if len(head) >= (o + WORD_BITS)
              and bool((symbols(head, o, False) == CLOCK_SYMBOL).all())]  # fmt: skip
    if not steady:
        rec.problems.append("clock lane: not the pixel clock (five bits high, five low, once per "
                            "symbol): a DVI sink locks on it")  # fmt: skip
    elif boundary not in steady:
        late = (boundary - steady[0]) % WORD_BITS
        rec.problems.append(f"clock lane: its rising edge is {late} bits before the data symbols "
                            "start; the sink cuts the symbols where the clock rises")  # fmt: skip


def receive(lanes: Lanes) -> Reception:
    """Align, check and decode ``lanes`` as a DVI sink does; the pins and the findings."""
    rec = Reception(None)
    words = _align(lanes, rec)
    if words is None:
        return rec
    _check_roles(words, rec)
    _check_skew(words, rec)
    if lanes.clock_bits is not None and rec.boundary is not None:
        _check_clock(lanes.clock_bits, rec.boundary, rec)
    kinds = DECODE_KIND[words]
    values = DECODE_VALUE[words]
    control = kinds[0] == CONTROL
    c = _held(values[0], control)
    de = (kinds[0] == DATA).astype(np.int64)
    colour = [np.where(kinds[k] == DATA, values[k], 0) for k in (2, 1, 0)]
    rec.pins = Pins(lanes.period_s, c & 1, (c >> 1) & 1, de, colour[0], colour[1], colour[2], (8, 8, 8))
    return rec
