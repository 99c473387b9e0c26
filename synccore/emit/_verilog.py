"""Verilog-2001 literals and declarations, shared by every emitter of the language."""

from __future__ import annotations


def uint(value: int, width: int) -> str:
    """A sized unsigned decimal literal, e.g. ``10'd800``."""
    if value < 0 or value >= 1 << width:
        raise ValueError(f"{value} does not fit in {width} bits")
    return f"{width}'d{value}"


def vector(width: int | None) -> str:
    """The range of a declaration: ``[9:0]``, or nothing for one bit."""
    return "" if width is None else f"[{width - 1}:0]"


def comment_lines(lines: tuple[str, ...]) -> list[str]:
    return [f"// {line}".rstrip() for line in lines]
