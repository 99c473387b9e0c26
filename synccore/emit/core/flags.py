"""Registered position flags: the core decides one cycle early.

Each flag is a single flip-flop that is 1 exactly while a position counter
(``h_pos`` or ``v_pos``) stands at one position ``at``.  It is loaded on the
advance before, from a compare of the counter against ``at - 1`` (wrapped), or,
when the flag of ``at - 1`` exists, straight from that flag.  Every output
flip-flop then takes its next value from one or two flags, and only the
counters' own increments remain as long paths.  Vertical flags change only when
the line ends (``h_at_last``), like ``v_pos``.  Roles whose positions coincide
share one register.
"""

from __future__ import annotations

from dataclasses import dataclass

from synccore.model import Timing


@dataclass(frozen=True)
class Flag:
    name: str  # the register
    axis: str  # "h" or "v"
    at: int  # the counter position at which the flag is 1
    reset: int  # its value during reset (the counters reset to 0)
    source: str  # a flag that is 1 one position before (or the field-end wire), or "" to compare
    before: str  # the constant ``at - 1`` (wrapped) to compare with, when source is ""
    before_value: int


FIELD_END = "v_at_field_end"
"""Interlaced cores: the wire that is 1 on the last line of the current field; the flag of
line 0 loads from it (the two fields end on different lines)."""


def _roles(t: Timing) -> tuple[tuple[str, str, int, str], ...]:
    """(role, axis, position, what it marks) of every flag the templates read."""
    return progressive_roles(t) + (_field0_roles(t) if t.interlaced else ())


def _field0_roles(t: Timing) -> tuple[tuple[str, str, int, str], ...]:
    """Interlaced: where field 0's vsync, half a line late, starts and ends."""
    line, column = t.vsync_at(0)
    return (
        ("h_at_vsync_f0", "h", column, "the cycle at which field 0's vsync changes, "
         "half a line after field 1's"),
        ("v_at_sync_start_f0", "v", line, "the first line of field 0's vsync pulse"),
        ("v_at_sync_end_f0", "v", line + t.spec.vertical.sync,
         "the line in which field 0's vsync pulse ends"),
    )


def progressive_roles(t: Timing) -> tuple[tuple[str, str, int, str], ...]:
    """The roles of every core, progressive or interlaced."""
    return (
        ("h_at_last", "h", t.h_last, "the last cycle of a line"),
        ("h_at_zero", "h", 0, "the first cycle of a line"),
        ("h_at_active_end", "h", t.h_active % t.h_total, "the first blanking cycle"),
        ("h_at_sync_start", "h", t.h_sync_start, "the first cycle of the hsync pulse"),
        ("h_at_sync_end", "h", t.h_sync_end, "the first cycle after the hsync pulse"),
        ("h_at_vsync", "h", t.v_sync_at_h, "the cycle at which vsync changes, "
         + ("the hsync leading edge" if t.spec.core.vsync_align == "hsync" else "the line start")),
        ("v_at_zero", "v", 0, "the first line of a frame"),
        ("v_at_active_end", "v", t.v_active % t.v_total, "the first blanking line"),
        ("v_at_sync_start", "v", t.v_sync_start, "the first line of the vsync pulse"),
        ("v_at_sync_end", "v", t.v_sync_end, "the first line after the vsync pulse"),
    )


def position_flags(t: Timing) -> tuple[tuple[Flag, ...], dict[str, str], dict[str, str]]:
    """The flag registers, role -> register name, and register name -> what it marks."""
    owner: dict[tuple[str, int], str] = {}
    role_of: dict[str, str] = {}
    marks: dict[str, str] = {}
    for role, axis, at, mark in _roles(t):
        name = owner.setdefault((axis, at), role)
        role_of[role] = name
        marks[name] = marks.get(name, mark) if name != role else mark
    flags = []
    for (axis, at), name in owner.items():
        total = t.h_total if axis == "h" else t.v_total
        before = (at - 1) % total
        source = owner.get((axis, before), "")
        if t.interlaced and (axis, at) == ("v", 0):
            source = FIELD_END
        flags.append(Flag(name=name, axis=axis, at=at, reset=int(at == 0), source=source,
                          before="" if source else f"{name.upper()}_FROM",
                          before_value=before))  # fmt: skip
    return tuple(flags), role_of, marks
