"""Writing a timing description: a :class:`Spec` as complete, commented YAML in the explicit form.

The inverse of :mod:`.reading` for the explicit form: :func:`spec_text` writes every
field a reader needs to rebuild the same spec (the clock, both axes, the core options,
the port prefix, and the board and colour sections when they differ from the
defaults), each with a short comment, under the caller's header comments.  ``synccore
new`` and the clock plan's adjusted timing (``synccore clock --write``) both write
through it, so there is one YAML writer.
"""

from __future__ import annotations

from collections.abc import Sequence
from fractions import Fraction

from synccore.spec import Axis, Board, Color, CoreOptions, Spec
from synccore.timings.modeline import clock_mhz_text
from synccore.units import fixed, in_unit

COMMENT_COLUMN = 26


def clock_text(clock: Fraction) -> tuple[str, str]:
    """The clock as the spec writes it (exact when whole Hz) and a comment if rounded."""
    whole = round(clock)
    if clock.denominator == 1:
        mhz = clock_mhz_text(clock).rstrip("0").rstrip(".")
        return f'"{mhz} MHz"', ""
    mhz = clock_mhz_text(Fraction(whole)).rstrip("0").rstrip(".")
    return f'"{mhz} MHz"', (f"  # exact: {clock.numerator}/{clock.denominator} Hz, "
                            "rounded to 1 Hz")  # fmt: skip


def written_clock(clock: Fraction) -> Fraction:
    """The clock a file written by :func:`spec_text` gives back: ``clock`` to the nearest Hz."""
    return Fraction(round(clock))


def _commented(text: str, comment: str) -> str:
    return f"{text.ljust(COMMENT_COLUMN)}# {comment}"


def _axis_yaml(label: str, unit: str, a: Axis) -> list[str]:
    return [
        f"{label}:",
        _commented(f"  active: {a.active}", f"visible {unit}"),
        _commented(f"  front_porch: {a.front_porch}", f"blank {unit} before the sync pulse"),
        _commented(f"  sync: {a.sync}", "sync pulse width"),
        _commented(f"  back_porch: {a.back_porch}", f"blank {unit} after the sync pulse"),
        _commented(f"  sync_polarity: {a.sync_polarity}", "positive: high during the pulse"),
    ]


def _core_yaml(core: CoreOptions) -> list[str]:
    lines = [
        "core:",
        _commented(f"  pixels_per_clock: {core.pixels_per_clock}", "1, 2, 4 or 8"),
        _commented(f"  clock_enable: {'true' if core.clock_enable else 'false'}",
                   "true adds a ce input"),  # fmt: skip
        _commented(f"  reset: {core.reset}", "sync_high, sync_low, async_high or async_low"),
        _commented(f"  lead: {core.lead}",
                   "x/y run this many cycles ahead; 1 fits a 1-stage pixel pipeline"),
    ]
    default = CoreOptions()
    if core.vsync_align != default.vsync_align:
        lines.append(_commented(f"  vsync_align: {core.vsync_align}",
                                "where in the line the vsync edges fall"))  # fmt: skip
    if core.scale != default.scale:
        lines.append(_commented(f"  scale: {core.scale}", "x and y count in steps of this"))
    return lines


def _board_yaml(board: Board) -> list[str]:
    if board == Board():
        return []
    lines = ["board:"]
    if board.clock_hz is not None:
        value, rounded = clock_text(board.clock_hz)
        lines.append(_commented(f"  clock_hz: {value}",
                                "the board oscillator" + (", rounded to 1 Hz" if rounded else "")))
    if board.family is not None:
        lines.append(_commented(f"  family: {board.family}", "FPGA family whose PLL is used"))
    return lines


def _color_yaml(color: Color) -> list[str]:
    if color == Color():
        return []
    return [
        "color:",
        _commented(f"  red: {color.red}", "bits on the red pins"),
        _commented(f"  green: {color.green}", "bits on the green pins"),
        _commented(f"  blue: {color.blue}", "bits on the blue pins"),
    ]


def spec_text(spec: Spec, *, comments: Sequence[str]) -> str:
    """``spec`` as a complete, commented timing description in the explicit form.

    ``comments`` are the header lines (without ``#``), saying where the timing came
    from.  Reading the text back gives the same name, axes, core options, port
    prefix, board and colour; the clock comes back to the nearest Hz
    (:func:`written_clock`), the file says so when it rounds.
    """
    h, v, clock = spec.horizontal, spec.vertical, spec.pixel_clock_hz
    clock_value, clock_comment = clock_text(clock)
    refresh = clock / (h.total * v.total)
    lines = [
        *(f"# {c}" for c in comments),
        f"# Totals: {h.total} x {v.total}; refresh {fixed(refresh, 3)} Hz; "
        f"line rate {in_unit(clock / h.total, 'kHz')} kHz.",
        "# Edit freely; `synccore show` checks it, `synccore build` turns it into HDL.",
        f"name: {spec.name}",
        f"pixel_clock_hz: {clock_value}{clock_comment}",
        *_axis_yaml("horizontal", "pixels", h),
        *_axis_yaml("vertical", "lines", v),
        *_core_yaml(spec.core),
        "ports:",
        _commented(f'  prefix: "{spec.port_prefix}"', "text put before every port name"),
        *_board_yaml(spec.board),
        *_color_yaml(spec.color),
    ]
    return "\n".join(lines) + "\n"
