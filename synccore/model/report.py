"""Plain-text figures about a timing, shared by the command line and the emitted headers."""

from __future__ import annotations

from synccore.model import Timing
from synccore.units import fixed, hz, in_unit, percent


def timing_table(t: Timing) -> list[tuple[str, ...]]:
    """Rows of the timing table: a header row, then one row per axis (and per-cycle row)."""
    h, v = t.spec.horizontal, t.spec.vertical

    def row(label: str, nums: tuple[int, ...], polarity: str) -> tuple[str, ...]:
        return (label, *(str(n) for n in nums), polarity)

    rows = [
        ("", "active", "front", "sync", "back", "total", "sync polarity"),
        row("horizontal (pixels)",
            (h.active, h.front_porch, h.sync, h.back_porch, h.total), h.sync_polarity),
    ]  # fmt: skip
    if t.ppc > 1:
        rows.append(row("horizontal (cycles)",
                        (t.h_active, t.h_front, t.h_sync, t.h_back, t.h_total), ""))  # fmt: skip
    rows.append(row("vertical (lines)",
                    (v.active, v.front_porch, v.sync, v.back_porch, v.total), v.sync_polarity))  # fmt: skip
    return rows


def figures(t: Timing) -> list[tuple[str, str]]:
    """Derived rates and shares as (label, text) pairs."""
    rows = [
        ("pixel clock", hz(t.pixel_clock_hz)),
    ]
    if t.ppc > 1:
        rows.append(("core clock", f"{hz(t.core_clock_hz)} ({t.ppc} pixels per clock)"))
    rows.append(("line rate", f"{in_unit(t.line_rate_hz, 'kHz')} kHz"))
    if t.interlaced:
        back = t.spec.vertical.back_porch
        rows += [
            ("field rate", f"{fixed(t.refresh_hz, 3)} Hz (frames at {fixed(t.frame_rate_hz, 3)} Hz)"),
            ("fields", f"field 0: {t.field_lines(0)} lines (back porch {back + 1}), "
                       f"field 1: {t.field_lines(1)} lines (back porch {back})"),
        ]  # fmt: skip
    else:
        rows.append(("refresh", f"{fixed(t.refresh_hz, 3)} Hz"))
    rows += [
        ("frame", f"{t.spec.horizontal.total} x {t.frame_lines} pixels in all, "
                  f"{t.frame_cycles} cycles"),
        ("blanking share", percent(t.blanking_share)),
    ]  # fmt: skip
    return rows


def options(t: Timing) -> list[tuple[str, str]]:
    """The core options in words."""
    c = t.spec.core
    align = ("at the hsync leading edge" if c.vsync_align == "hsync"
             else "at the start of a line")  # fmt: skip
    return [
        ("pixels per clock", str(c.pixels_per_clock)),
        ("clock enable", "yes (ce input)" if c.clock_enable else "no"),
        ("reset", c.reset),
        ("lead of x/y", f"{c.lead} cycle{'s' if c.lead != 1 else ''}"),
        ("vsync edges", align),
        *([("scale of x/y", f"divided by {c.scale}")] if c.scale > 1 else []),
    ]


def text_table(rows: list[tuple[str, ...]]) -> list[str]:
    """Rows laid out in fixed-width columns (first column left-aligned, the rest right)."""
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    lines = []
    for r in rows:
        cells = [r[0].ljust(widths[0])] + [c.rjust(w) for c, w in zip(r[1:], widths[1:], strict=True)]
        lines.append("  ".join(cells).rstrip())
    return lines
