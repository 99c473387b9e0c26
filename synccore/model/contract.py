"""The bench contract: the conventions every bench, the measurement and the Amaranth engine share.

The timing rules themselves live in :class:`~synccore.model.Timing`; this module
names, once, what the programs around a core agree on besides them: how long a
bench holds reset, the seed of the irregular clock enable, which port resets a
core and at what level, and the event records a measurement harness writes
(their fields, how they are read back, and how long a run lasts).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import NamedTuple

from synccore.model.timing import Timing

RESET_CYCLES = 4
"""Clock cycles every bench holds a core in reset before it releases it."""

LFSR_SEED = 0xACE1
"""Seed of the 16-bit LFSR behind the benches' irregular clock enable.

The LFSR has the polynomial x^16 + x^14 + x^13 + x^11 + 1: on every clock it
shifts up by one bit and takes ``bit15 ^ bit13 ^ bit12 ^ bit10`` in at bit 0.
ce is 0 when its two lowest bits are both 0, so about three cycles in four advance.
"""


class ResetPort(NamedTuple):
    """The reset input of a core: its name in the port contract, and the level that resets."""

    base: str  # "rst" (active high) or "rst_n" (active low), before any port prefix
    active: int  # the level that holds the core in reset


_RESET_PORTS = {
    "sync_high": ResetPort("rst", 1),
    "async_high": ResetPort("rst", 1),
    "sync_low": ResetPort("rst_n", 0),
    "async_low": ResetPort("rst_n", 0),
}


def reset_port(reset: str) -> ResetPort:
    """The reset port of a core whose ``core.reset`` is ``reset``.

    ``*_high`` resets are a port ``rst`` that resets at 1; ``*_low`` resets are
    a port ``rst_n`` that resets at 0, whether synchronous or asynchronous.
    """
    try:
        return _RESET_PORTS[reset]
    except KeyError:
        raise ValueError(f"core.reset must be one of {', '.join(_RESET_PORTS)}, got {reset!r}") from None


# The monitored values, in the order of an event line (and least significant
# field first where they are packed into one vector): (name, bits).
MONITOR_FIELDS: tuple[tuple[str, int], ...] = (
    ("adv", 32),  # advancing clock edges since reset
    ("hsync", 1),
    ("vsync", 1),
    ("de", 1),
    ("hblank", 1),
    ("vblank", 1),
    ("frame_start", 1),
    ("line_start", 1),
    ("x", 16),  # x delayed by the lead, so it lines up with de
    ("y", 16),
    ("x_last", 16),  # x on the last de cycle seen
    ("step_faults", 16),  # cycles inside a de run where x did not advance by N or y changed
    ("line_starts", 16),  # line_start pulses so far (modulo 2**16)
    ("frame_starts", 16),
)

FIELD_MONITOR: tuple[str, int] = ("field", 1)
"""The monitored value an interlaced core adds at the end of an event line: its field port."""


def monitor_fields(interlaced: bool) -> tuple[tuple[str, int], ...]:
    """The monitored values of a core's events: :data:`MONITOR_FIELDS`, and the field when interlaced."""
    return MONITOR_FIELDS + ((FIELD_MONITOR,) if interlaced else ())


@dataclass(frozen=True)
class Event:
    """Every monitored value just after a change of hsync, vsync, de or a blank.

    ``adv`` counts the advancing edges so far, so the outputs show position ``adv - 1``.
    """

    adv: int
    hsync: int
    vsync: int
    de: int
    hblank: int
    vblank: int
    frame_start: int
    line_start: int
    x: int
    y: int
    x_last: int
    step_faults: int
    line_starts: int
    frame_starts: int
    field: int = 0  # the field port of an interlaced core; 0 for a progressive one


def parse_events(text: str) -> list[Event]:
    """Events from a harness's event file: one line of integers per event, in field order."""
    lengths = {len(f): [name for name, _ in f] for f in (monitor_fields(False), monitor_fields(True))}
    out = []
    for line in text.splitlines():
        values = [int(v) for v in line.split()]
        names = lengths.get(len(values))
        if names:
            out.append(Event(**dict(zip(names, values, strict=True))))
    return out


def decode(word: int, *, interlaced: bool = False) -> Event:
    """Unpack one monitor vector read from the harness."""
    values = {}
    for name, bits in monitor_fields(interlaced):
        values[name] = word & ((1 << bits) - 1)
        word >>= bits
    return Event(**values)


def stop_count(t: Timing, frames: int) -> int:
    """Advancing edges a measurement runs for: the frames, plus two lines to see the next start."""
    return frames * t.frame_cycles + 2 * t.h_total
