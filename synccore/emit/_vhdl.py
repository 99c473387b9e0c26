"""VHDL (-93 and -2008) literals and declarations, shared by every emitter of the language."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any


def bit(value: int) -> str:
    """A std_logic literal."""
    return f"'{value & 1}'"


def zeros(width: int) -> str:
    """A string literal of ``width`` zero bits, e.g. ``"00"``."""
    return '"' + "0" * width + '"'


def port_type(width: int | None) -> str:
    return "std_logic" if width is None else f"std_logic_vector({width - 1} downto 0)"


def comment_lines(lines: tuple[str, ...]) -> list[str]:
    return [f"-- {line}".rstrip() for line in lines]


def bits(value: int, width: int) -> str:
    """A bit-string literal of ``value`` in ``width`` bits, e.g. ``"0101"``."""
    if value < 0 or value >= 1 << width:
        raise ValueError(f"{value} does not fit in {width} bits")
    return '"' + format(value, f"0{width}b") + '"'


def port_lines(ports: Sequence[Any]) -> list[str]:
    """A port clause's lines, names and comments aligned: ``name : in  type;  -- comment``
    (each port has ``name``, ``direction`` "in"/"out", ``width`` and ``comment``)."""
    name_w = max(len(p.name) for p in ports)
    rows = []
    for i, p in enumerate(ports):
        mode = "in " if p.direction == "in" else "out"
        end = ";" if i < len(ports) - 1 else ""
        rows.append((f"{p.name.ljust(name_w)} : {mode} {port_type(p.width)}{end}", p.comment))
    width = max(len(t) for t, _ in rows)
    return [f"{t.ljust(width)}  -- {c}" for t, c in rows]
